import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { fileSource } from '../../adapters/file-source.ts';
import { runTrial } from '../../src/run/run-trial.ts';
import { slHistogramJson, summaryJson, SUMMARY_HISTOGRAM_BIN_UM } from '../../src/output/summary-json.ts';
import { timeAtLengthFromHistogram } from '../../src/report/plot-data.ts';
import { speciesCurve } from '../../src/model/species.ts';

const DEMO = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.ndjson');

describe('the summary’s time-at-length histogram and filament lengths', () => {
  it('coarsens the fine histogram, trims empty ends, and keeps every second', () => {
    const fine = new Float64Array(8000);
    fine[2500] = 0.5;
    fine[2509] = 0.25;
    fine[2731] = 1;
    const h = slHistogramJson(fine);
    expect(h?.bin_um).toBeCloseTo(SUMMARY_HISTOGRAM_BIN_UM, 12);
    expect(h?.start_um).toBeCloseTo(2.5, 9);
    expect(h?.seconds[0]).toBeCloseTo(0.75, 12);
    expect(h?.seconds.at(-1)).toBe(1);
    expect(h?.seconds.reduce((a, b) => a + b, 0)).toBeCloseTo(1.75, 12);
    expect(slHistogramJson(new Float64Array(10))).toBeNull();
  });

  it('holds, for the demo walk, as many seconds as its unflagged strides cover, and the curve’s filament lengths', async () => {
    const summary = summaryJson(await runTrial(fileSource(DEMO), { source: DEMO }).done);
    const calf = summary.muscles.calf;
    if (calf === undefined) throw new Error('no calf');
    const covered = calf.strides.filter((s) => s.flagged !== true).reduce((a, s) => a + (s.end_s - s.start_s - s.gap_s), 0);
    const held = calf.sl_histogram?.seconds.reduce((a, b) => a + b, 0) ?? 0;
    expect(held).toBeCloseTo(covered, 6);
    // Human preset: thin filaments 33 × 38.5 nm (Walker & Schrodt 1974, Anat Rec 178:63–81).
    expect(calf.filaments.thin_um).toBeCloseTo(1.2705, 9);
    const bins = timeAtLengthFromHistogram(calf.sl_histogram ?? { start_um: 0, bin_um: 0.01, seconds: [] }, speciesCurve('human'), 0.02);
    expect(bins.reduce((a, b) => a + b.percent, 0)).toBeCloseTo(100, 9);
    expect(bins[0]?.toUm).toBeCloseTo((bins[0]?.fromUm ?? 0) + 0.02, 9);
  });
});
