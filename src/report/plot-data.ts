/**
 * The numbers behind the report's plots, from one muscle's summary JSON and its force–length curve.
 * Pure functions of numbers (no I/O, no plotting library): what is drawn is testable on its own.
 */
import { breakpoints, curveFromGeometry, geometryProblems, regionAt, withFilaments, type FilamentGeometry, type ForceLengthCurve } from '../model/geometry.ts';
import { normalCdf } from '../model/normal.ts';
import { REGION_KEYS, type RegionKey } from '../model/regions.ts';
import { isSpecies, SPECIES_GEOMETRY, type Species } from '../model/species.ts';
import type { CycleJson, MuscleJson, SlHistogramJson } from '../output/summary-json.ts';

/** A point of the force–length curve. */
export interface CurvePoint {
  readonly slUm: number;
  readonly force: number;
}

/** The calibration file's names for a muscle's own filament lengths, as a summary may carry them (`filaments`). */
const FILAMENT_KEYS = {
  thick_um: 'thickUm',
  thin_um: 'thinUm',
  bare_zone_um: 'bareZoneUm',
  z_disc_um: 'zDiscUm',
  steep_zero_um: 'steepZeroUm',
  steep_break_force: 'steepBreakForce',
} as const satisfies Record<string, keyof FilamentGeometry>;

/**
 * The curve to draw for a muscle: its species' preset, with the muscle's own filament lengths when the
 * summary carries them (`filaments`, the calibration's key names). An unknown species or unusable lengths
 * fall back to a preset, said in `note`.
 */
export function curveOf(m: Pick<MuscleJson, 'species'>): { readonly curve: ForceLengthCurve; readonly note: string | null; readonly ownFilaments: boolean } {
  const known = isSpecies(m.species);
  const base = SPECIES_GEOMETRY[known ? (m.species as Species) : 'human'];
  const note = known ? null : `species "${m.species}" has no preset here; the human curve is drawn`;
  const given: unknown = (m as { filaments?: unknown }).filaments;
  if (typeof given !== 'object' || given === null) return { curve: curveFromGeometry(base), note, ownFilaments: false };
  const overrides: Partial<Record<keyof FilamentGeometry, number>> = {};
  for (const [key, field] of Object.entries(FILAMENT_KEYS)) {
    const value = (given as Record<string, unknown>)[key];
    if (typeof value === 'number') overrides[field] = value;
  }
  const geometry = withFilaments(base, overrides);
  const problems = geometryProblems(geometry);
  if (problems.length > 0) return { curve: curveFromGeometry(base), note: `the muscle's filament lengths make no curve (${problems.join('; ')}); the preset is drawn`, ownFilaments: false };
  return { curve: curveFromGeometry(geometry), note, ownFilaments: true };
}

/** The piecewise-linear curve through its breakpoints, with a short zero stretch either side. */
export function curvePoints(curve: ForceLengthCurve, marginUm = 0.25): CurvePoint[] {
  const points = breakpoints(curve).map((b) => ({ slUm: b.slUm, force: b.force }));
  const first = points[0] as CurvePoint;
  const last = points[points.length - 1] as CurvePoint;
  return [{ slUm: first.slUm - marginUm, force: 0 }, ...points, { slUm: last.slUm + marginUm, force: 0 }];
}

/** A stretch of sarcomere length that lies in one region. */
export interface RegionBand {
  readonly region: RegionKey;
  readonly fromUm: number;
  readonly toUm: number;
}

/** The regions' length intervals, clipped to [loUm, hiUm]; regions outside are left out. */
export function regionBands(curve: ForceLengthCurve, loUm: number, hiUm: number): RegionBand[] {
  const edges = [Number.NEGATIVE_INFINITY, curve.steepZeroUm, curve.steepBreakUm, curve.plateauStartUm, curve.plateauEndUm, curve.descendingZeroUm, Number.POSITIVE_INFINITY];
  const bands: RegionBand[] = [];
  REGION_KEYS.forEach((region, i) => {
    const fromUm = Math.max(loUm, edges[i] as number);
    const toUm = Math.min(hiUm, edges[i + 1] as number);
    if (toUm > fromUm) bands.push({ region, fromUm, toUm });
  });
  return bands;
}

/** One bar of the time-at-length histogram: the share of time (%) with the sarcomere length in [fromUm, toUm). */
export interface LengthBin {
  readonly fromUm: number;
  readonly toUm: number;
  readonly percent: number;
  /** Region at the bin's middle. */
  readonly region: RegionKey;
}

export interface TimeAtLength {
  readonly bins: LengthBin[];
  /** How the histogram was made, for the plot's caption. */
  readonly method: 'measured' | 'cycle' | 'regions' | 'none';
}

/** Weight of each gait-cycle point in time: equal steps, the two ends (0% and 100%) half each (trapezoid rule). */
function cycleWeights(n: number): number[] {
  if (n === 1) return [1];
  return Array.from({ length: n }, (_, i) => (i === 0 || i === n - 1 ? 0.5 : 1));
}

/**
 * Time at each length from the gait-cycle curve: every point of the cycle stands for an equal share of
 * the stride, and across strides its length is spread as a normal distribution with the point's mean and
 * SD (a point with no SD puts all its time in one bin). Bins of `binUm` cover the spread; percentages sum
 * to 100 up to the tails beyond ±4 SD.
 */
export function timeAtLengthFromCycle(cycle: CycleJson, curve: ForceLengthCurve, binUm = 0.02): LengthBin[] {
  const points: { mean: number; sd: number; w: number }[] = [];
  const weights = cycleWeights(cycle.sl_mean_um.length);
  cycle.sl_mean_um.forEach((mean, i) => {
    if (mean === null || !Number.isFinite(mean)) return;
    const sd = cycle.sl_sd_um[i];
    points.push({ mean, sd: sd !== null && sd !== undefined && Number.isFinite(sd) && sd > 0 ? sd : 0, w: weights[i] as number });
  });
  if (points.length === 0) return [];
  let lo = Number.POSITIVE_INFINITY;
  let hi = Number.NEGATIVE_INFINITY;
  for (const p of points) {
    lo = Math.min(lo, p.mean - 4 * p.sd);
    hi = Math.max(hi, p.mean + 4 * p.sd);
  }
  const first = Math.floor(lo / binUm);
  const last = Math.max(first, Math.ceil(hi / binUm) - 1);
  const mass = new Float64Array(last - first + 1);
  let total = 0;
  for (const p of points) {
    total += p.w;
    if (p.sd === 0) {
      const b = Math.min(mass.length - 1, Math.max(0, Math.floor(p.mean / binUm) - first));
      mass[b] = (mass[b] as number) + p.w;
      continue;
    }
    for (let b = 0; b < mass.length; b++) {
      const from = (first + b) * binUm;
      const share = normalCdf((from + binUm - p.mean) / p.sd) - normalCdf((from - p.mean) / p.sd);
      mass[b] = (mass[b] as number) + p.w * share;
    }
  }
  const bins: LengthBin[] = [];
  for (let b = 0; b < mass.length; b++) {
    const fromUm = (first + b) * binUm;
    bins.push({ fromUm, toUm: fromUm + binUm, percent: (100 * (mass[b] as number)) / total, region: regionAt(curve, fromUm + binUm / 2) });
  }
  return bins;
}

/**
 * Time at each length from the trial's region fractions alone (exact shares, coarse bins): each region's
 * share of time spread evenly over the part of the region between the trial's shortest and longest length.
 * Bar heights are percent of time per `perUm` µm, so wide and narrow regions compare fairly.
 */
export function timeAtLengthFromRegions(m: Pick<MuscleJson, 'trial'>, curve: ForceLengthCurve, perUm = 0.02): LengthBin[] {
  const { sl_min_um: min, sl_max_um: max, region_fraction: fraction } = m.trial;
  if (min === null || max === null || !(max > min)) return [];
  const bins: LengthBin[] = [];
  for (const band of regionBands(curve, min, max)) {
    const share = fraction[band.region];
    if (!(share > 0)) continue;
    bins.push({ fromUm: band.fromUm, toUm: band.toUm, percent: (100 * share * perUm) / (band.toUm - band.fromUm), region: band.region });
  }
  return bins;
}

/**
 * Time at each length measured by the pipeline (the summary's `sl_histogram`), regrouped into bins of
 * `binUm` (a whole multiple of the summary's bin; otherwise the summary's own bins are kept).
 */
export function timeAtLengthFromHistogram(histogram: SlHistogramJson, curve: ForceLengthCurve, binUm = 0.02): LengthBin[] {
  const group = Math.max(1, Math.round(binUm / histogram.bin_um));
  const width = group * histogram.bin_um;
  const total = histogram.seconds.reduce((a, b) => a + b, 0);
  if (!(total > 0)) return [];
  const bins: LengthBin[] = [];
  for (let i = 0; i < histogram.seconds.length; i += group) {
    let seconds = 0;
    for (let j = i; j < Math.min(histogram.seconds.length, i + group); j++) seconds += histogram.seconds[j] as number;
    const fromUm = histogram.start_um + i * histogram.bin_um;
    bins.push({ fromUm, toUm: fromUm + width, percent: (100 * seconds) / total, region: regionAt(curve, fromUm + width / 2) });
  }
  return bins;
}

/**
 * The best time-at-length histogram the summary allows: measured (`sl_histogram`), else estimated from the
 * gait-cycle curve, else from the region fractions.
 */
export function timeAtLength(m: Pick<MuscleJson, 'trial' | 'cycle'> & { readonly sl_histogram?: SlHistogramJson | null }, curve: ForceLengthCurve, binUm = 0.02): TimeAtLength {
  if (m.sl_histogram !== null && m.sl_histogram !== undefined) {
    const bins = timeAtLengthFromHistogram(m.sl_histogram, curve, binUm);
    if (bins.length > 0) return { bins, method: 'measured' };
  }
  if (m.cycle !== null && m.cycle !== undefined) {
    const bins = timeAtLengthFromCycle(m.cycle, curve, binUm);
    if (bins.length > 0) return { bins, method: 'cycle' };
  }
  const bins = timeAtLengthFromRegions(m, curve, binUm);
  return { bins, method: bins.length > 0 ? 'regions' : 'none' };
}

/** A point of the gait-cycle plot: mean sarcomere length and the mean ± SD band. */
export interface CycleRow {
  readonly percent: number;
  readonly meanUm: number;
  readonly lowUm: number;
  readonly highUm: number;
}

export function cycleRows(cycle: CycleJson | null | undefined): CycleRow[] {
  if (cycle === null || cycle === undefined) return [];
  const rows: CycleRow[] = [];
  cycle.percent.forEach((percent, i) => {
    const mean = cycle.sl_mean_um[i];
    if (mean === null || mean === undefined || !Number.isFinite(mean)) return;
    const sdRaw = cycle.sl_sd_um[i];
    const sd = sdRaw !== null && sdRaw !== undefined && Number.isFinite(sdRaw) ? sdRaw : 0;
    rows.push({ percent, meanUm: mean, lowUm: mean - sd, highUm: mean + sd });
  });
  return rows;
}

/** Mean toe-off as % of the gait cycle (stance time over stride time of the phased strides); null when unknown. */
export function toeOffPercent(m: Pick<MuscleJson, 'trial'>): number | null {
  const stance = m.trial.stance;
  const swing = m.trial.swing;
  if (stance === null || swing === null || stance === undefined || swing === undefined) return null;
  const total = stance.duration_s + swing.duration_s;
  return total > 0 ? (100 * stance.duration_s) / total : null;
}

/** One stride's range for the range-bar plot. */
export interface StrideRow {
  readonly index: number;
  readonly minUm: number;
  readonly maxUm: number;
  readonly meanUm: number | null;
  readonly p5Um: number | null;
  readonly p95Um: number | null;
  readonly flagged: boolean;
}

export function strideRows(m: Pick<MuscleJson, 'strides'>): StrideRow[] {
  const rows: StrideRow[] = [];
  for (const s of m.strides) {
    if (s.sl_min_um === null || s.sl_max_um === null) continue;
    rows.push({
      index: s.index,
      minUm: s.sl_min_um,
      maxUm: s.sl_max_um,
      meanUm: s.sl_mean_um,
      p5Um: s.sl_p5_um ?? null,
      p95Um: s.sl_p95_um ?? null,
      flagged: s.flagged === true,
    });
  }
  return rows;
}

/** A length range that holds everything drawn for a muscle, with a little room, rounded to 0.1 µm. */
export function lengthDomain(values: readonly (number | null)[], curve: ForceLengthCurve): [number, number] {
  const finite = values.filter((v): v is number => v !== null && Number.isFinite(v));
  if (finite.length === 0) return [Math.floor(curve.steepZeroUm * 10) / 10, Math.ceil(curve.descendingZeroUm * 10) / 10];
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  const pad = Math.max(0.05, (hi - lo) * 0.08);
  return [Math.floor((lo - pad) * 10) / 10, Math.ceil((hi + pad) * 10) / 10];
}
