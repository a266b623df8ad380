import { lastValueFrom, toArray } from 'rxjs';
import { stringify } from 'csv-stringify/sync';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readDeviceMapping, type DeviceMapping } from '../../adapters/device-mapping.ts';
import { trialSource } from '../../adapters/trial-source.ts';
import type { Frame } from '../../src/trial/records.ts';
import { tempDir } from './invented-trial.ts';

const MAPPINGS = join(import.meta.dirname, '..', '..', 'adapters', 'mappings');
const tmp = tempDir();
afterAll(() => tmp.remove());

async function example(name: string): Promise<DeviceMapping> {
  const result = await readDeviceMapping(join(MAPPINGS, name));
  if (!result.ok) throw new Error(result.problems.join('\n'));
  return result.mapping;
}

async function framesOf(path: string, mapping: DeviceMapping, eventsPath: string): Promise<Frame[]> {
  return (await lastValueFrom(trialSource(path, { mapping, eventsPath }).pipe(toArray()))).flat();
}

// Unit factors: 1 cm = 10 mm, 1 m = 1000 mm, 1 ms = 1e-3 s, 1 µs = 1e-6 s, 1 rad = 180/π degrees
// (BIPM 2019, The International System of Units, SI Brochure 9th edition; table numbers not at hand).
describe('the example mapping station-wide-cm (a row per frame, a column per muscle, events from insoles on their own clock)', () => {
  it('reads the station\'s table and the insoles\' events onto one clock, in time order', async () => {
    const mapping = await example('station-wide-cm.json');
    const notes = 'Invented treadmill station\r\nsubject invented-05, trial 2\r\nexported with notes above the header\r\n';
    const table = tmp.file(
      'station.csv',
      notes +
        stringify(
          [
            ['Time (ms)', 'LG fascicle (cm)', 'LG pennation (rad)', 'LG conf', 'VL fascicle (cm)'],
            ['1000', '5,23', String(Math.PI / 8).replace('.', ','), '0,95', '8,10'],
            ['1010', '5,25', '', '0,9', ''],
          ],
          { delimiter: ';', record_delimiter: '\r\n' },
        ),
    );
    // The insoles' clock reads 1.25 s more than the station's: a foot strike at 2.255 s there is 1.005 s here.
    const events = tmp.file('insoles.tsv', stringify([['time', 'kind', 'foot'], ['2.255', 'HS', 'L']], { delimiter: '\t' }));
    const frames = await framesOf(table, mapping, events);
    expect(frames.map((f) => (f.kind === 'sample' ? `${f.muscle}@${f.tS}` : f.kind === 'event' ? `${f.event}@${f.tS.toFixed(3)}` : f.kind))).toEqual([
      'header',
      'lat_gastroc@1',
      'vastus_lat@1',
      'foot_strike@1.005',
      'lat_gastroc@1.01',
    ]);
    const lg = frames[1];
    expect(lg?.kind === 'sample' && [lg.fascicleMm, lg.pennationDeg, lg.quality]).toEqual([expect.closeTo(52.3, 9), expect.closeTo(22.5, 9), 0.95]);
    expect(frames[2]).toMatchObject({ kind: 'sample', fascicleMm: expect.closeTo(81, 9) });
    expect(mapping.muscles).toEqual({ lat_gastroc: expect.objectContaining({ side: 'left' }), vastus_lat: expect.objectContaining({ side: 'right' }) });
  });
});

describe('the example mapping walkway-long-si (a row per sample with probe channels, footswitch events as NDJSON)', () => {
  it("turns the probe channels, metres and microseconds into ours, and the footswitches' words into gait events", async () => {
    const mapping = await example('walkway-long-si.json');
    const table = tmp.file(
      'walkway.tsv',
      stringify(
        [
          ['timestamp_us', 'probe', 'fl_m', 'pa_deg', 'track_q'],
          ['500000', 'P1', '0.0412', '24.5', '0.97'],
          ['500000', 'P2', '0.0655', '', ''],
        ],
        { delimiter: '\t' },
      ),
    );
    const events = tmp.file('footswitch.ndjson', `${JSON.stringify({ ms: 400, switch: 'heel_on', leg: 'r' })}\n${JSON.stringify({ ms: 1100, switch: 'toe_off', leg: 'r' })}\n`);
    const frames = await framesOf(table, mapping, events);
    expect(frames).toEqual([
      { kind: 'header', muscles: {}, line: 1 },
      { kind: 'event', tS: 0.4, event: 'foot_strike', side: 'right', line: 1 },
      expect.objectContaining({ kind: 'sample', muscle: 'soleus', tS: 0.5, fascicleMm: expect.closeTo(41.2, 9), pennationDeg: 24.5, quality: 0.97 }),
      expect.objectContaining({ kind: 'sample', muscle: 'tib_ant', tS: 0.5, fascicleMm: expect.closeTo(65.5, 9), quality: 1 }),
      { kind: 'event', tS: 1.1, event: 'toe_off', side: 'right', line: 2 },
    ]);
  });
});
