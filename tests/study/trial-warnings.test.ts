import { describe, expect, it } from 'vitest';
import { trialWarnings } from '../../src/study/trial-warnings.ts';
import type { MuscleJson, SummaryJson } from '../../src/output/summary-json.ts';

function summaryOf(muscles: Record<string, Partial<MuscleJson>>): SummaryJson {
  return { muscles } as unknown as SummaryJson;
}

const good: Partial<MuscleJson> = { calibration_source: 'header', side_source: 'declared', segmentation: 'events' };

describe('trialWarnings', () => {
  it('says nothing for a trial calibrated, with declared sides and strides from foot strikes', () => {
    expect(trialWarnings(summaryOf({ calf: good, thigh: good }))).toEqual([]);
  });

  it('names the muscles of each warning, one text per kind, in a fixed order', () => {
    const summary = summaryOf({
      calf: { ...good, calibration_source: 'baseline', segmentation: 'estimated' },
      thigh: { ...good, side_source: 'assumed' },
      shin: { ...good, calibration_source: null, side_source: 'assumed' },
    });
    expect(trialWarnings(summary)).toEqual(['UNCALIBRATED: calf, shin', 'side assumed: thigh, shin', 'strides estimated: calf']);
  });

  it('takes a summary written before segmentation was kept as saying nothing of it', () => {
    const { segmentation: _segmentation, ...old } = good;
    expect(trialWarnings(summaryOf({ calf: old }))).toEqual([]);
  });

  it('keeps muscle names of any text', () => {
    // Parsed, as a summary is read: the key is the muscle's own, not an object's prototype.
    const muscles = JSON.parse(JSON.stringify({ x: { ...good, side_source: 'assumed' } }).replace('"x"', '"__proto__"')) as Record<string, Partial<MuscleJson>>;
    expect(trialWarnings(summaryOf(muscles))).toEqual(['side assumed: __proto__']);
  });
});
