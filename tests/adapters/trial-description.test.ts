import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { isTrialDescription, MAX_RECORDINGS, parseTrialDescription, readTrialDescription } from '../../adapters/trial-description.ts';
import { tempDir } from './invented-trial.ts';

const tmp = tempDir();
afterAll(() => tmp.remove());

const minimal = { format: 'lengthwise-trial', version: 1, recordings: [{ file: 'calf.csv' }] };

describe('a trial description', () => {
  it('reads every key, its paths beside the description and its offsets in seconds', () => {
    const r = parseTrialDescription(
      {
        ...minimal,
        subject: 'S01',
        trial: 'walk-1',
        recordings: [
          { file: 'calf.csv', mapping: 'calf-map.json' },
          { file: 'probes/thigh.csv', mapping: '/lab/maps/thigh.json', time_offset_s: -0.35 },
        ],
        events: { file: 'events.tsv', mapping: 'events-map.json' },
        calibration: 'cal.json',
      },
      join('trials', 'S01', 'walk-1.json'),
    );
    expect(r).toEqual({
      ok: true,
      description: {
        path: join('trials', 'S01', 'walk-1.json'),
        subject: 'S01',
        trial: 'walk-1',
        recordings: [
          { file: join('trials', 'S01', 'calf.csv'), mapping: join('trials', 'S01', 'calf-map.json'), timeOffsetS: 0 },
          { file: join('trials', 'S01', 'probes', 'thigh.csv'), mapping: '/lab/maps/thigh.json', timeOffsetS: -0.35 },
        ],
        events: { file: join('trials', 'S01', 'events.tsv'), mapping: join('trials', 'S01', 'events-map.json') },
        calibration: join('trials', 'S01', 'cal.json'),
      },
    });
  });

  it('leaves out what it does not give', () => {
    expect(parseTrialDescription(minimal, 'd.json')).toEqual({
      ok: true,
      description: { path: 'd.json', subject: null, trial: null, recordings: [{ file: 'calf.csv', mapping: null, timeOffsetS: 0 }], events: null, calibration: null },
    });
  });

  it('refuses a description without recordings, with too many, or with a bad offset, saying where', () => {
    const problems = (value: unknown): readonly string[] => {
      const r = parseTrialDescription(value, 'd.json');
      return r.ok ? [] : r.problems;
    };
    expect(problems({ ...minimal, recordings: [] })[0]).toBe('recordings: must name at least one recording');
    expect(problems({ ...minimal, recordings: Array.from({ length: MAX_RECORDINGS + 1 }, (_, i) => ({ file: `r${i}.csv` })) })[0]).toBe(`recordings: may name at most ${MAX_RECORDINGS} recordings`);
    expect(problems({ ...minimal, recordings: [{ file: 'calf.csv', time_offset_s: '0.35' }] })[0]).toBe('recordings.0.time_offset_s: must be a number of seconds');
    expect(problems({ ...minimal, recordings: [{ file: '' }] })[0]).toMatch(/^recordings\.0\.file: must not be empty/);
    expect(problems({ ...minimal, version: 2 })[0]).toBe('version: must be 1 (this reader reads version 1 of lengthwise-trial)');
  });

  it('refuses a key it does not know with the nearest one', () => {
    const r = parseTrialDescription({ ...minimal, recordings: [{ file: 'calf.csv', time_ofset_s: 1 }] }, 'd.json');
    expect(r.ok ? [] : r.problems[0]).toBe('`recordings.0.time_ofset_s`: unknown key; did you mean `recordings.0.time_offset_s`?');
  });

  it('refuses a file named twice, which would give its records twice', () => {
    const r = parseTrialDescription({ ...minimal, recordings: [{ file: 'calf.csv' }, { file: './calf.csv' }] }, 'd.json');
    expect(r.ok ? [] : r.problems).toEqual(['recordings[1].file names the same file as recordings[0].file (calf.csv): each file of a trial is read once; name each recording once']);
  });

  it('is told from a trial file by its format, in any layout of its JSON', async () => {
    expect(await isTrialDescription(tmp.file('d.json', JSON.stringify(minimal, null, 2)))).toBe(true);
    expect(await isTrialDescription(tmp.file('bom.json', `\uFEFF${JSON.stringify(minimal)}`))).toBe(true);
    expect(await isTrialDescription(tmp.file('t.ndjson', '{"format":"lengthwise-stream","version":1}\n{"t":0,"muscle":"calf","fascicle_mm":50}\n'))).toBe(false);
    expect(await isTrialDescription(tmp.file('m.json', '{"format": "lengthwise-mapping", "version": 1}'))).toBe(false);
    expect(await isTrialDescription(tmp.file('t.csv', 'time_s,muscle,fascicle_mm\n0,calf,50\n'))).toBe(false);
    expect(await isTrialDescription(join(tmp.dir, 'missing.json'))).toBe(false);
  });

  it('says a file that is not JSON is not accepted, naming it', async () => {
    const path = tmp.file('broken.json', '{"format": "lengthwise-trial",');
    const r = await readTrialDescription(path);
    expect(r.ok ? [] : r.problems[0]).toMatch(new RegExp(`^trial description file ${path.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} is not valid JSON`));
  });
});
