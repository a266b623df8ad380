import { describe, expect, it } from 'vitest';
import { summaryJson, trialFigures } from '../../src/output/summary-json.ts';
import { stridesCsv, csvField, STRIDE_COLUMNS } from '../../src/output/strides-csv.ts';
import { zeroRegionRecord } from '../../src/model/regions.ts';
import { speciesCurve } from '../../src/model/species.ts';
import { emptyFrameCounts, type StrideSummary, type TrialState } from '../../src/trial/state.ts';

function stride(index: number, startS: number, endS: number, slMinUm: number, slMaxUm: number, slMeanUm: number, plateau: number, gapS = 0): StrideSummary {
  return {
    index,
    startS,
    endS,
    slMinUm,
    slMaxUm,
    slMeanUm,
    regionFraction: { ...zeroRegionRecord(), plateau, descending: 1 - plateau },
    forceMean: 0.9,
    gapS,
    sampleCount: 100,
  };
}

function state(): TrialState {
  return {
    source: 'trial.ndjson',
    subject: 's1',
    trial: null,
    calibrated: true,
    frames: { ...emptyFrameCounts(), received: 10, accepted: 8, rejected: 2, rejectedByReason: { schema: 2 } },
    muscles: new Map([
      [
        'calf, medial',
        {
          name: 'calf, medial',
          side: 'left',
          sideSource: 'declared',
          species: 'human',
          curve: speciesCurve('human'),
          sarcomeresInSeries: 20000,
          calibrationSource: 'file',
          latest: null,
          current: null,
          strides: [stride(0, 0, 1, 2.5, 3.0, 2.7, 0.5), stride(1, 1, 3, 2.6, 3.2, 2.9, 0.25)],
        },
      ],
    ]),
    warnings: [],
    lastTS: 3,
    firstTS: 0,
    ended: true,
  };
}

describe('summaryJson', () => {
  it('follows the lengthwise-summary version 1 contract', () => {
    const json = summaryJson(state());
    expect(json).toMatchObject({
      format: 'lengthwise-summary',
      version: 1,
      source: 'trial.ndjson',
      calibrated: true,
      frames: { received: 10, accepted: 8, rejected: 2, low_quality: 0, rejected_by_reason: { schema: 2 } },
    });
    const m = json.muscles['calf, medial'];
    expect(m?.species).toBe('human');
    expect(m?.sarcomeres_in_series).toBe(20000);
    expect(m?.strides[0]).toMatchObject({ index: 1, start_s: 0, end_s: 1, sl_min_um: 2.5, sl_max_um: 3.0, sl_mean_um: 2.7, force_mean: 0.9 });
    expect(Object.keys(m?.strides[0]?.region_fraction ?? {})).toEqual(['too_short', 'steep_ascending', 'shallow_ascending', 'plateau', 'descending', 'no_overlap']);
  });

  it('takes trial figures over complete strides, weighted by the time each covers', () => {
    const t = trialFigures(state().muscles.get('calf, medial')?.strides ?? []);
    expect(t.stride_count).toBe(2);
    expect(t.sl_min_um).toBe(2.5);
    expect(t.sl_max_um).toBe(3.2);
    expect(t.sl_mean_um).toBeCloseTo((2.7 * 1 + 2.9 * 2) / 3, 12);
    expect(t.region_fraction.plateau).toBeCloseTo((0.5 * 1 + 0.25 * 2) / 3, 12);
    expect(t.region_fraction.plateau + t.region_fraction.descending).toBeCloseTo(1, 12);
  });

  it('writes unknown figures as null, since JSON has no NaN', () => {
    const t = trialFigures([]);
    expect(t).toMatchObject({ stride_count: 0, sl_min_um: null, sl_mean_um: null });
    expect(JSON.parse(JSON.stringify(summaryJson({ ...state(), muscles: new Map() })))).toBeTruthy();
  });
});

describe('stridesCsv', () => {
  it('writes one row per stride and muscle under a header with units in the column names', () => {
    const rows = stridesCsv(state()).trimEnd().split('\r\n');
    expect(rows[0]).toBe(STRIDE_COLUMNS.join(','));
    expect(rows[0]).toContain('sl_min_um');
    expect(rows).toHaveLength(3);
    expect(rows[1]?.startsWith('"calf, medial",left,1,0,1,1,2.5,3,2.7,')).toBe(true);
  });

  it('quotes per RFC 4180 (Shafranovich 2005, RFC 4180 §2): commas, quotes and line breaks', () => {
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('x\ny')).toBe('"x\ny"');
    expect(csvField(Number.NaN)).toBe('');
    expect(csvField(null)).toBe('');
  });
});

describe('summaryJson: flags, phases and the cycle curve', () => {
  it('leaves flagged strides out of the trial figures and counts them', () => {
    const s = state();
    const m = s.muscles.get('calf, medial');
    if (m === undefined) throw new Error('fixture');
    (m.strides as StrideSummary[]).push({ ...stride(2, 3, 4, 1.9, 3.9, 2.0, 0, 0.5), flagged: true });
    const t = summaryJson(s).muscles['calf, medial']?.trial;
    expect(t).toMatchObject({ stride_count: 3, flagged_count: 1, strides_used: 2, sl_min_um: 2.5, sl_max_um: 3.2 });
    // (2.7 × 1 + 2.9 × 2) / 3 = 2.8333…, written to 4 decimals.
    expect(t?.sl_mean_um).toBe(2.8333);
    expect(summaryJson(s).muscles['calf, medial']?.strides[2]).toMatchObject({ flagged: true, gap_fraction: 0.5 });
  });

  it('writes region probabilities only when the calibration states an uncertainty', () => {
    const json = summaryJson(state());
    expect(json.muscles['calf, medial']?.strides[0]).not.toHaveProperty('region_probability');
    expect(json.muscles['calf, medial']?.segmentation).toBeNull();
    expect(json.muscles['calf, medial']?.cycle).toBeNull();
  });
});

describe('stridesCsv: later figures', () => {
  it('keeps the original columns first, in their order, and adds phase columns with units', () => {
    expect(STRIDE_COLUMNS.slice(0, 19)).toEqual([
      'muscle', 'side', 'stride', 'start_s', 'end_s', 'duration_s', 'sl_min_um', 'sl_max_um', 'sl_mean_um',
      'too_short_fraction', 'steep_ascending_fraction', 'shallow_ascending_fraction', 'plateau_fraction', 'descending_fraction', 'no_overlap_fraction',
      'force_mean', 'gap_s', 'sample_count', 'segmentation',
    ]);
    expect(STRIDE_COLUMNS).toContain('stance_sl_p95_um');
    expect(STRIDE_COLUMNS).toContain('swing_velocity_max_mm_s');
    const rows = stridesCsv(state()).trimEnd().split('\r\n');
    expect(rows[1]?.split(',').length).toBe(STRIDE_COLUMNS.length + 1); // the quoted muscle name holds one comma
  });
});
