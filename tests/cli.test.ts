import { describe, expect, it } from 'vitest';
import { PassThrough } from 'node:stream';
import { main } from '../src/cli.ts';
import type { CommandIo } from '../src/commands/io.ts';

function capture(): { io: CommandIo; out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  const stream = new PassThrough() as unknown as NodeJS.WriteStream;
  return {
    out,
    err,
    io: { out: (t) => out.push(t), err: (t) => err.push(t), stdout: stream, stderr: stream, stdin: new PassThrough() as unknown as NodeJS.ReadStream, env: {} },
  };
}

describe('lengthwise (the command)', () => {
  it('lists its commands on --help and exits 0', async () => {
    const c = capture();
    expect(await main(['--help'], c.io)).toBe(0);
    const text = c.out.join('\n');
    for (const name of ['replay', 'live', 'simulate', 'calibrate', 'curve', 'summarize']) expect(text).toContain(name);
  });

  it('shows usage and exits 2 with no command', async () => {
    const c = capture();
    expect(await main([], c.io)).toBe(2);
    expect(c.out.join('\n')).toContain('usage: lengthwise');
  });

  it('names an unknown command and shows what is accepted', async () => {
    const c = capture();
    expect(await main(['replya'], c.io)).toBe(2);
    expect(c.err.join('\n')).toContain('unknown command "replya"');
    expect(c.err.join('\n')).toContain('replay');
  });

  it('does not take inherited object keys for commands', async () => {
    const c = capture();
    expect(await main(['toString'], c.io)).toBe(2);
  });
});
