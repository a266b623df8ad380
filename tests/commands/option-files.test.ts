import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { calibrationOption, mappingOption, trialFiles } from '../../src/commands/option-files.ts';
import { captureIo } from '../helpers/capture-io.ts';
import { DEFAULT_SETTINGS } from '../../src/trial/settings.ts';

const MAPPINGS = join(import.meta.dirname, '..', '..', 'adapters', 'mappings');
const DEMO_CAL = join(import.meta.dirname, '..', '..', 'replays', 'demo-calibration.json');

describe('option files', () => {
  it('give nothing, and say nothing, when the option is not given', async () => {
    const t = captureIo();
    expect(await calibrationOption('replay', undefined, t.io)).toEqual({ ok: true, value: undefined });
    expect(await mappingOption('replay', undefined, t.io)).toEqual({ ok: true, value: undefined });
    expect(t.err).toEqual([]);
  });

  it('read a good file', async () => {
    const t = captureIo();
    const cal = await calibrationOption('replay', DEMO_CAL, t.io);
    const map = await mappingOption('live', join(MAPPINGS, 'twin-probe-si.json'), t.io);
    expect(cal.ok && cal.value !== undefined).toBe(true);
    expect(map.ok && map.value?.lengthUnit).toBe('m');
    expect(t.err).toEqual([]);
  });

  it('refuse a missing or wrong file, naming the command and each problem', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-options-'));
    const wrong = join(dir, 'wrong.json');
    await writeFile(wrong, JSON.stringify({ format: 'lengthwise-mapping', version: 1, units: { length: 'furlong' } }));
    const t = captureIo();
    expect(await mappingOption('summarize', wrong, t.io)).toEqual({ ok: false });
    expect(await calibrationOption('live', join(dir, 'none.json'), t.io)).toEqual({ ok: false });
    expect(t.err[0]).toMatch(/^lengthwise summarize: the device mapping was not accepted:\n {2}.*length/);
    expect(t.err[1]).toMatch(/^lengthwise live: the calibration was not accepted:\n {2}/);
  });

  it('read a trial\'s two files together, and give nothing once one is refused, the calibration said first', async () => {
    const t = captureIo();
    const both = await trialFiles('replay', { calibration: DEMO_CAL, mapping: join(MAPPINGS, 'twin-probe-si.json') }, t.io);
    expect(both?.calibration).toBeDefined();
    expect(both?.mapping?.lengthUnit).toBe('m');
    expect(await trialFiles('replay', {}, t.io)).toEqual({ settings: DEFAULT_SETTINGS, calibration: undefined, mapping: undefined });
    expect(t.err).toEqual([]);
    expect(await trialFiles('live', { calibration: join(MAPPINGS, 'none.json'), mapping: join(MAPPINGS, 'none.json') }, t.io)).toBeNull();
    expect(t.err).toHaveLength(1);
    expect(t.err[0]).toMatch(/^lengthwise live: the calibration was not accepted/);
  });
});
