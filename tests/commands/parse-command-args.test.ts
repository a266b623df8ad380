import { captureIo } from '../helpers/capture-io.ts';
import { describe, expect, it } from 'vitest';
import { parseCommandArgs } from '../../src/commands/parse-command-args.ts';


const OPTIONS = { speed: { type: 'string', default: '1' }, plain: { type: 'boolean', default: false } } as const;

describe('parseCommandArgs', () => {
  it('gives the values and positionals', () => {
    const c = captureIo();
    const parsed = parseCommandArgs('replay', 'usage: x', ['a.ndjson', '--speed', '4'], OPTIONS, c.io);
    if (typeof parsed === 'number') throw new Error('expected values');
    expect(parsed.values.speed).toBe('4');
    expect(parsed.values.plain).toBe(false);
    expect(parsed.positionals).toEqual(['a.ndjson']);
  });

  it('prints the help and ends with 0 on -h or --help', () => {
    for (const flag of ['-h', '--help']) {
      const c = captureIo();
      expect(parseCommandArgs('replay', 'usage: x', [flag], OPTIONS, c.io)).toBe(0);
      expect(c.out).toEqual(['usage: x']);
    }
  });

  it('says what was wrong, then the help, and ends with 2 on an unknown option or a refused positional', () => {
    const c = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--sped', '2'], OPTIONS, c.io)).toBe(2);
    expect(c.err[0]).toMatch(/^lengthwise replay: .*--sped[\s\S]*usage: x$/);
    const d = captureIo();
    expect(parseCommandArgs('curve', 'usage: y', ['stray'], OPTIONS, d.io, { allowPositionals: false })).toBe(2);
    expect(d.err[0]).toContain('stray');
  });

  it('refuses an option that takes one value given twice, naming both values, rather than keeping the last', () => {
    const c = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['a.ndjson', '--speed', '4', '--speed=max'], OPTIONS, c.io)).toBe(2);
    expect(c.err[0]).toBe('lengthwise replay: --speed was given 2 times ("4", "max"); it takes one value: give it once\n(lengthwise replay --help for the usage)');
    const d = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--plain', '--plain'], OPTIONS, d.io)).toBe(2);
    expect(d.err[0]).toMatch(/--plain was given 2 times: give it once/);
  });

  it('takes an option declared as repeatable as often as it is given', () => {
    const c = captureIo();
    const parsed = parseCommandArgs('curve', 'usage: y', ['--sl', '2', '--sl', '3'], { sl: { type: 'string', multiple: true } }, c.io);
    if (typeof parsed === 'number') throw new Error('expected values');
    expect(parsed.values.sl).toEqual(['2', '3']);
  });
});
