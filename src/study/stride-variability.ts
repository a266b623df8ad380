/**
 * Between-stride variability of a trial: for each stride figure (sarcomere length min, max, mean, its
 * excursion, each region's time fraction), the sample SD across the trial's unflagged strides and the
 * coefficient of variation (SD ÷ mean, a fraction). Read from the summary's strides, the same strides the
 * trial figures are over. Fewer than two strides: empty; a mean of 0: no CV.
 */
import { REGION_KEYS } from '../model/regions.ts';
import { meanOf, sampleSd } from '../model/group-stats.ts';
import type { MuscleJson, StrideJson } from '../output/summary-json.ts';

/** A stride figure: its column stem and unit suffix, and how to read it from a stride. */
interface StrideFigure {
  readonly stem: string;
  /** `_um` for lengths (the SD has the unit), '' for fractions. */
  readonly unit: string;
  readonly read: (s: StrideJson) => number | null;
}

const STRIDE_FIGURES: readonly StrideFigure[] = [
  { stem: 'sl_min', unit: '_um', read: (s) => s.sl_min_um },
  { stem: 'sl_max', unit: '_um', read: (s) => s.sl_max_um },
  { stem: 'sl_mean', unit: '_um', read: (s) => s.sl_mean_um },
  { stem: 'excursion', unit: '_um', read: (s) => s.excursion_um },
  ...REGION_KEYS.map((k): StrideFigure => ({ stem: `${k}_fraction`, unit: '', read: (s) => s.region_fraction[k] })),
];

/** The columns, in order: for each figure `STEM_stride_sd[_um]` then `STEM_stride_cv`. */
export const VARIABILITY_COLUMNS: readonly string[] = STRIDE_FIGURES.flatMap((f) => [`${f.stem}_stride_sd${f.unit}`, `${f.stem}_stride_cv`]);

const cache = new WeakMap<MuscleJson, Readonly<Record<string, number | null>>>();

/** Each variability column's value for the muscle's unflagged strides (null: not known). */
export function strideVariability(m: MuscleJson): Readonly<Record<string, number | null>> {
  const known = cache.get(m);
  if (known !== undefined) return known;
  const used = m.strides.filter((s) => s.flagged !== true);
  const out: Record<string, number | null> = {};
  for (const f of STRIDE_FIGURES) {
    const values: number[] = [];
    for (const s of used) {
      const v = f.read(s);
      if (v !== null && Number.isFinite(v)) values.push(v);
    }
    const mean = meanOf(values);
    const sd = sampleSd(values, mean);
    out[`${f.stem}_stride_sd${f.unit}`] = Number.isFinite(sd) ? sd : null;
    out[`${f.stem}_stride_cv`] = Number.isFinite(sd) && mean !== 0 ? sd / mean : null;
  }
  cache.set(m, out);
  return out;
}
