import { afterAll, describe, expect, it } from 'vitest';
import { stringify } from 'csv-stringify/sync';
import { parseDeviceMapping } from '../../adapters/device-mapping.ts';
import { PROBE_HEAD_SAMPLES, PROBE_TAIL_BYTES, probeRecording, probeStrideS } from '../../adapters/recording-probe.ts';
import { ndjsonTrial, tempDir } from './invented-trial.ts';

const tmp = tempDir();
afterAll(() => tmp.remove());

function mapping(value: object) {
  const r = parseDeviceMapping({ format: 'lengthwise-mapping', version: 1, ...value });
  if (!r.ok) throw new Error(r.problems.join('; '));
  return r.mapping;
}

describe('probeRecording', () => {
  it('takes the first sample time from the start and the last from the end of a file longer than it reads, on the joint clock', async () => {
    const lines = ndjsonTrial(20_000);
    const path = tmp.file('long.ndjson', `${lines.join('\n')}\n`);
    expect(Buffer.byteLength(lines.join('\n'))).toBeGreaterThan(4 * PROBE_TAIL_BYTES);
    expect(20_000).toBeGreaterThan(PROBE_HEAD_SAMPLES);
    const p = await probeRecording(path, null, -0.5);
    expect(p.firstS).toBe(-0.5);
    expect(p.lastS).toBeCloseTo(199.99 - 0.5, 9);
    expect(p.muscles).toEqual(['calf']);
  });

  it('reads a lab table\'s last rows with the layout found at its start (";", decimal commas, milliseconds, notes above the header)', async () => {
    const rows = [['Time (ms)', 'LG (cm)', 'VL (cm)']];
    for (let i = 0; i < 6000; i++) rows.push([String(i * 10), '5,2', '8,1']);
    const path = tmp.file('station.csv', `Invented station\r\n\r\n${stringify(rows, { delimiter: ';', record_delimiter: '\r\n' })}`);
    const m = mapping({ fields: { t: 'Time (ms)' }, units: { length: 'cm', time: 'ms' }, muscles: { lat_gastroc: { fascicle: 'LG (cm)' }, vastus_lat: { fascicle: 'VL (cm)' } } });
    const p = await probeRecording(path, m, 0);
    expect([p.firstS, p.lastS]).toEqual([0, 59.99]);
    expect([...p.muscles].sort()).toEqual(['lat_gastroc', 'vastus_lat']);
  });

  it('knows no span for a file without a valid sample', async () => {
    const p = await probeRecording(tmp.file('bad.csv', stringify([['time_s', 'muscle', 'fascicle_mm'], ['0', 'calf', '-3']])), null, 0);
    expect([p.firstS, p.lastS, p.muscles]).toEqual([Number.NaN, Number.NaN, []]);
  });

  it('fails as reading the file fails', async () => {
    await expect(probeRecording(`${tmp.dir}/missing.csv`, null, 0)).rejects.toThrow(/cannot read .*missing\.csv \(ENOENT: no such file\)/);
  });
});

describe('probeStrideS', () => {
  it('is the median time between foot strikes of one side at the start of an events file, in any order', async () => {
    const rows = [['t', 'event', 'side']];
    for (let k = 0; k < 20; k++) rows.push([String(1.1 * k + 0.55), 'foot_strike', 'right'], [String(1.1 * k), 'foot_strike', 'left']);
    expect(await probeStrideS(tmp.file('events.csv', stringify(rows)), mapping({ events: { fields: { t: 't' } } }))).toBeCloseTo(1.1, 9);
  });

  it('is null without two foot strikes of a side', async () => {
    expect(await probeStrideS(tmp.file('one.csv', stringify([['t', 'event', 'side'], ['1', 'foot_strike', 'left']])), mapping({ events: { fields: { t: 't' } } }))).toBeNull();
  });
});
