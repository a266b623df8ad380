import { captureIo } from './helpers/capture-io.ts';
import { describe, expect, it } from 'vitest';
import { main } from '../src/cli.ts';


describe('lengthwise (the command)', () => {
  it('lists its commands on --help and exits 0', async () => {
    const c = captureIo();
    expect(await main(['--help'], c.io)).toBe(0);
    const text = c.out.join('\n');
    for (const name of ['replay', 'live', 'simulate', 'calibrate', 'curve', 'summarize']) expect(text).toContain(name);
  });

  it('shows usage and exits 2 with no command', async () => {
    const c = captureIo();
    expect(await main([], c.io)).toBe(2);
    expect(c.out.join('\n')).toContain('usage: lengthwise');
  });

  it('names an unknown command and shows what is accepted', async () => {
    const c = captureIo();
    expect(await main(['replya'], c.io)).toBe(2);
    expect(c.err.join('\n')).toContain('unknown command "replya"');
    expect(c.err.join('\n')).toContain('replay');
  });

  it('does not take inherited object keys for commands', async () => {
    const c = captureIo();
    expect(await main(['toString'], c.io)).toBe(2);
  });
});
