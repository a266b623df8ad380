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

  it('names an unknown option and the nearest one, and ends with 2', () => {
    const c = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--sped', '2'], OPTIONS, c.io)).toBe(2);
    expect(c.err).toEqual(['lengthwise replay: `--sped`: unknown option; did you mean `--speed`?\n(lengthwise replay --help lists every option)']);
    const far = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--colour'], OPTIONS, far.io)).toBe(2);
    expect(far.err[0]).toMatch(/^lengthwise replay: `--colour`: unknown option\n/);
  });

  it('refuses a positional where the command takes none, naming it', () => {
    const d = captureIo();
    expect(parseCommandArgs('curve', 'usage: y', ['stray'], OPTIONS, d.io, { allowPositionals: false })).toBe(2);
    expect(d.err[0]).toMatch(/^lengthwise curve: `stray`: this command takes options only/);
  });

  it.each([['-1.5'], ['-.5'], ['-1-4'], ['-2,3'], ['-0']])('takes the negative number %s as the value of an option before it', (value) => {
    const c = captureIo();
    const parsed = parseCommandArgs('replay', 'usage: x', ['--speed', value, 'a.ndjson'], OPTIONS, c.io);
    if (typeof parsed === 'number') throw new Error(c.err.join('\n'));
    expect(parsed.values.speed).toBe(value);
    expect(parsed.positionals).toEqual(['a.ndjson']);
  });

  it('never takes an option for the value of the option before it', () => {
    const c = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--speed', '--plain'], OPTIONS, c.io)).toBe(2);
    expect(c.err[0]).toContain('`--speed` needs a value, and `--plain` looks like an option');
    const d = captureIo();
    const parsed = parseCommandArgs('replay', 'usage: x', ['--speed=--plain'], OPTIONS, d.io);
    if (typeof parsed === 'number') throw new Error(d.err.join('\n'));
    expect(parsed.values.speed).toBe('--plain');
  });

  it('says that an option lacks its value, or that a switch takes none', () => {
    const c = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--speed'], OPTIONS, c.io)).toBe(2);
    expect(c.err[0]).toContain('`--speed` needs a value: give `--speed VALUE`');
    const d = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--plain=yes'], OPTIONS, d.io)).toBe(2);
    expect(d.err[0]).toContain('`--plain` takes no value');
  });

  it('takes everything after -- as positionals', () => {
    const c = captureIo();
    const parsed = parseCommandArgs('replay', 'usage: x', ['--', '--odd-name.ndjson'], OPTIONS, c.io);
    if (typeof parsed === 'number') throw new Error(c.err.join('\n'));
    expect(parsed.positionals).toEqual(['--odd-name.ndjson']);
  });

  it('refuses an option that takes one value given twice, naming both values, rather than keeping the last', () => {
    const c = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['a.ndjson', '--speed', '4', '--speed=max'], OPTIONS, c.io)).toBe(2);
    expect(c.err[0]).toBe('lengthwise replay: `--speed` was given 2 times ("4", "max"); it takes one value: give it once\n(lengthwise replay --help lists every option)');
    const d = captureIo();
    expect(parseCommandArgs('replay', 'usage: x', ['--plain', '--plain'], OPTIONS, d.io)).toBe(2);
    expect(d.err[0]).toMatch(/`--plain` was given 2 times: give it once/);
  });

  it('takes an option declared as repeatable as often as it is given', () => {
    const c = captureIo();
    const parsed = parseCommandArgs('curve', 'usage: y', ['--sl', '2', '--sl', '3'], { sl: { type: 'string', multiple: true } }, c.io);
    if (typeof parsed === 'number') throw new Error('expected values');
    expect(parsed.values.sl).toEqual(['2', '3']);
  });
});
