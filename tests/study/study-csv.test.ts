import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { REGION_KEYS } from '../../src/model/regions.ts';
import type { SummaryJson } from '../../src/output/summary-json.ts';
import { studyColumns, studyCsv } from '../../src/study/study-csv.ts';
import { summarizeTrial } from '../../src/study/summarize-trial.ts';
import { csvNumber, csvRecords, expectTrialFiguresIn, parseCsv, trialFolder, type TrialFolder } from './generated-trials.ts';

let folder: TrialFolder;
const summaries: SummaryJson[] = [];
beforeAll(async () => {
  folder = await trialFolder();
  for (const [name, seed, scenario] of [['walk.ndjson', 31, 'walk'], ['run.ndjson', 32, 'run']] as const) {
    const outcome = await summarizeTrial((await folder.trial(name, { seed, scenario })).path);
    if (!outcome.ok) throw new Error(outcome.message);
    summaries.push(outcome.summary);
  }
});
afterAll(() => folder.remove());

/** A copy of a summary with some fields replaced, for the odd cases. */
function edited(s: SummaryJson, edit: (copy: SummaryJson) => void): SummaryJson {
  const copy = structuredClone(s);
  edit(copy);
  return copy;
}


describe('studyCsv', () => {
  it('writes only the header row for no trials', () => {
    expect(parseCsv(studyCsv([]))).toEqual([studyColumns([])]);
  });

  it('names units in the columns and gives each region its own fraction column', () => {
    const columns = studyColumns(summaries);
    for (const name of ['sl_min_um', 'sl_max_um', 'sl_mean_um', 'sl_p5_um', 'sl_p95_um', 'sarcomeres_in_series', 'stride_count']) {
      expect(columns).toContain(name);
    }
    for (const key of REGION_KEYS) expect(columns).toContain(`${key}_fraction`);
    expect(new Set(columns).size).toBe(columns.length);
  });

  it('writes one row per trial and muscle whose figures are exactly the summary JSON numbers', () => {
    const rows = csvRecords(studyCsv(summaries));
    expect(rows).toHaveLength(4);
    let i = 0;
    for (const s of summaries) {
      for (const [muscle, m] of Object.entries(s.muscles)) {
        const row = rows[i++]!;
        expect(row).toMatchObject({ source_file: s.source, subject: s.subject, trial: s.trial, muscle, side: m.side, species: m.species });
        expectTrialFiguresIn(row, m.trial);
        expect(row.uncalibrated).toBe('false');
        expect(row.trial_ended).toBe('true');
      }
    }
  });

  it('quotes commas, quotes and line breaks so they read back whole (RFC 4180)', () => {
    const odd = edited(summaries[0]!, (c) => {
      c.source = 'trials/a, "quoted".ndjson';
      c.subject = 'two\r\nlines';
    });
    const text = studyCsv([odd]);
    expect(text.endsWith('\r\n')).toBe(true);
    const [row] = csvRecords(text);
    expect(row?.source_file).toBe('trials/a, "quoted".ndjson');
    expect(row?.subject).toBe('two\r\nlines');
  });

  it('leaves a cell empty for a figure that is unknown', () => {
    const none = edited(summaries[0]!, (c) => {
      const m = c.muscles.calf!;
      m.trial = { ...m.trial, stride_count: 0, sl_min_um: null, sl_max_um: null, sl_mean_um: null, sl_p5_um: null, force_mean: null };
      m.strides = [];
      m.sarcomeres_in_series = null;
      c.subject = null;
    });
    const [row] = csvRecords(studyCsv([none]));
    expect(row).toMatchObject({ subject: '', sl_min_um: '', sl_mean_um: '', force_mean: '', sarcomeres_in_series: '', stride_count: '0', sl_p5_um: '' });
  });

  it('flags an uncalibrated muscle, an assumed side, estimated strides, and counts flagged strides', () => {
    const flagged = edited(summaries[0]!, (c) => {
      const m = c.muscles.calf!;
      m.calibration_source = 'baseline';
      m.side_source = 'assumed';
      Object.assign(m, { segmentation: 'estimated' });
      Object.assign(m.trial, { flagged_count: 2 });
      c.calibrated = false;
    });
    const rows = csvRecords(studyCsv([flagged]));
    expect(rows[0]).toMatchObject({ uncalibrated: 'true', side_assumed: 'true', segmentation_estimated: 'true', flagged_strides: '2' });
    expect(rows[1]).toMatchObject({ uncalibrated: 'false', side_assumed: 'false' });
  });

  it('counts flagged strides from the strides, and leaves flags empty when the summary does not say', () => {
    const older = edited(summaries[0]!, (c) => {
      const m = c.muscles.calf!;
      const trial = m.trial as unknown as Record<string, unknown>;
      delete trial.flagged_count;
      m.strides = m.strides.map((s, i) => ({ ...s, flagged: i < 3 }));
      const t = c.muscles.thigh!;
      delete (t.trial as unknown as Record<string, unknown>).flagged_count;
      t.strides = t.strides.map((s) => {
        const copy = { ...s } as Record<string, unknown>;
        delete copy.flagged;
        return copy as unknown as typeof s;
      });
      delete (t as unknown as Record<string, unknown>).segmentation;
    });
    const rows = csvRecords(studyCsv([older]));
    expect(rows.map((r) => r.flagged_strides)).toEqual(['3', '']);
    expect(rows[1]?.segmentation_estimated).toBe('');
  });

  it('gives every further number of the trial figures a column, stance and swing under their prefix', () => {
    const s = summaries[0]!;
    const columns = studyColumns([s]);
    const rows = csvRecords(studyCsv([s]));
    for (const [muscle, m] of Object.entries(s.muscles)) {
      const row = rows.find((r) => r.muscle === muscle)!;
      for (const phase of ['stance', 'swing'] as const) {
        const figures = m.trial[phase];
        if (figures === null) continue;
        expect(csvNumber(row[`${phase}_sl_mean_um`])).toBe(figures.sl_mean_um);
        expect(csvNumber(row[`${phase}_sl_p95_um`])).toBe(figures.sl_p95_um);
        for (const key of REGION_KEYS) expect(csvNumber(row[`${phase}_${key}_fraction`])).toBe(figures.region_fraction[key]);
      }
    }
    expect(columns).toContain('stance_plateau_fraction');
  });

  it('picks up figures added to the summary later by name, the same columns for every row', () => {
    const richer = edited(summaries[0]!, (c) => {
      for (const m of Object.values(c.muscles)) {
        Object.assign(m.trial, {
          made_up_figure_um: 1.25,
          region_probability: { ...m.trial.region_fraction, plateau: 0.4 },
          region_probability_90: Object.fromEntries(REGION_KEYS.map((k) => [k, [0.1, 0.6]])),
        });
      }
    });
    const columns = studyColumns([richer, summaries[1]!]);
    expect(columns).toEqual(expect.arrayContaining(['made_up_figure_um', 'plateau_probability', 'plateau_probability_p5', 'plateau_probability_p95']));
    const rows = csvRecords(studyCsv([richer, summaries[1]!]));
    expect(rows[0]).toMatchObject({ made_up_figure_um: '1.25', plateau_probability: '0.4', plateau_probability_p5: '0.1', plateau_probability_p95: '0.6' });
    // A trial without those figures has the same columns, left empty.
    expect(rows[2]).toMatchObject({ made_up_figure_um: '', plateau_probability: '' });
    expect(rows.every((r) => Object.keys(r).length === columns.length)).toBe(true);
  });

  it('has the same columns whatever the calibrations provide: uncertainty figures are empty without one', () => {
    const plain = summaries[0]!;
    const uncertain = edited(plain, (c) => {
      for (const m of Object.values(c.muscles)) {
        Object.assign(m.trial, {
          region_probability: { ...m.trial.region_fraction },
          region_probability_90: Object.fromEntries(REGION_KEYS.map((k) => [k, [0.1, 0.6]])),
        });
      }
    });
    expect(studyColumns([plain])).toEqual(studyColumns([uncertain]));
    expect(studyColumns([plain])).toEqual(expect.arrayContaining(['plateau_probability', 'plateau_probability_p5', 'stance_plateau_probability_p95']));
    expect(csvRecords(studyCsv([plain]))[0]?.plateau_probability).toBe('');
  });

  it('gives each stride figure\'s sample SD and CV across the unflagged strides', () => {
    const s = edited(summaries[0]!, (c) => {
      const m = c.muscles.calf!;
      const template = m.strides[0]!;
      m.strides = [2.5, 2.6, 2.9, 9.9].map((mean, i) => ({ ...template, index: i + 1, sl_mean_um: mean, flagged: i === 3 }));
    });
    const [row] = csvRecords(studyCsv([s]));
    // 2.5, 2.6, 2.9: mean 2.6667, sample SD 0.2082 (the flagged 9.9 left out).
    expect(csvNumber(row?.sl_mean_stride_sd_um)).toBeCloseTo(0.2082, 4);
    expect(csvNumber(row?.sl_mean_stride_cv)).toBeCloseTo(0.2082 / 2.6667, 4);
    const one = edited(summaries[0]!, (c) => {
      c.muscles.calf!.strides = c.muscles.calf!.strides.slice(0, 1);
    });
    expect(csvRecords(studyCsv([one]))[0]?.sl_mean_stride_sd_um).toBe('');
  });
});
