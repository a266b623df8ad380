/** The `--summary FILE.json` contract (lengthwise-summary, version 1), built from a TrialState. */
import { REGION_KEYS, zeroRegionRecord, type RegionKey } from '../model/regions.ts';
import type { ForceLengthCurve } from '../model/geometry.ts';
import type { StrideListView } from '../trial/stride-list.ts';
import { CYCLE_POINTS, HISTOGRAM_BIN_UM, spreadOf, type MuscleState, type RegionProbabilityFigures, type SegmentFigures, type StrideSummary, type TrialState } from '../trial/state.ts';
import { cycleSd, histogramQuantile, histogramRegionProbability } from '../trial/stride-figures.ts';
import type { CountSpread, SpreadShape } from '../model/count-spread.ts';
import { METHOD_LABEL } from '../model/calibration.ts';
import type { CurveShape } from '../model/muscle-model.ts';
import { provenanceJson, type ProvenanceJson } from './provenance-json.ts';
import { roundFigures } from './output-precision.ts';

/** Per region, the 90% interval [5th, 95th percentile] of its fraction under calibration uncertainty. */
export type RegionIntervalJson = Record<RegionKey, [number | null, number | null]>;

/** The figures every stretch has: a stride, a phase, or the trial over its strides or phases. */
export interface FiguresJson {
  sl_min_um: number | null;
  sl_max_um: number | null;
  sl_mean_um: number | null;
  sl_p5_um: number | null;
  sl_p95_um: number | null;
  region_fraction: Record<RegionKey, number>;
  /** Present only when the calibration states an uncertainty. */
  region_probability?: Record<RegionKey, number | null>;
  region_probability_90?: RegionIntervalJson;
  force_mean: number | null;
  force_lv_mean: number | null;
  force_tendon_mean: number | null;
  velocity_min_mm_s: number | null;
  velocity_max_mm_s: number | null;
  gap_s: number;
  sample_count: number;
}

export interface PhaseJson extends FiguresJson {
  start_s: number;
  end_s: number;
  duration_s: number;
  excursion_um: number | null;
}

export interface StrideJson extends FiguresJson {
  index: number;
  start_s: number;
  end_s: number;
  duration_s: number;
  excursion_um: number | null;
  gap_fraction: number;
  /** Too much gap time: left out of the trial figures and the cycle curve. */
  flagged: boolean;
  stance: PhaseJson | null;
  swing: PhaseJson | null;
}

/** Trial figures over a set of stretches: min/max over them, means and fractions weighted by covered time. */
export interface TrialPhaseJson extends FiguresJson {
  /** Mean over the stretches of their excursion (max − min). */
  excursion_mean_um: number | null;
  duration_s: number;
}

export interface TrialFiguresJson extends TrialPhaseJson {
  /** Complete strides, flagged ones included. */
  stride_count: number;
  /** Strides left out of the trial figures for too much gap time. */
  flagged_count: number;
  /** Strides the trial figures are over (stride_count − flagged_count). */
  strides_used: number;
  /** Strides with a toe-off, whose stance and swing figures are over them. */
  phased_count: number;
  stance: TrialPhaseJson | null;
  swing: TrialPhaseJson | null;
}

export interface CycleJson {
  /** 0, 1, …, 100 (% of the gait cycle from the muscle's stride start). */
  percent: number[];
  sl_mean_um: (number | null)[];
  /** Sample SD across strides (n − 1); null with fewer than two strides. */
  sl_sd_um: (number | null)[];
  stride_count: number;
}

export interface MuscleJson {
  species: string;
  side: string | null;
  side_source: string | null;
  sarcomeres_in_series: number | null;
  /** SD of the sarcomere count relative to the count (0: the calibration states none). */
  sarcomeres_in_series_relative_sd: number;
  /** How that uncertainty is distributed: "lognormal" (in the count) or "length_normal" (in the sarcomere length it came from). */
  sarcomeres_in_series_distribution: SpreadShape;
  calibration_source: string | null;
  /** The calibration's method in words ("prior from published architecture", …); null until known. */
  calibration_method: string | null;
  /** Where the calibration came from (the calibration file's provenance keys); null when it does not say. */
  calibration_provenance: ProvenanceJson | null;
  /** Which curve gives the force: "geometric", "gaussian" or "three-gaussian" (regions always come from the geometry). */
  shape: CurveShape;
  /** Where each stride starts: at a foot strike, or (estimated strides) at the fascicle-length minimum; null before any. */
  stride_start: 'foot_strike' | 'fascicle_length_minimum' | null;
  /** The activation-dependent optimal length, when on: its λ, the calibration's activation, samples with their own. */
  activation: ActivationJson | null;
  /** How the strides were found: "events" (foot strikes), "estimated" (from the fascicle signal), null (none). */
  segmentation: 'events' | 'estimated' | null;
  strides: StrideJson[];
  trial: TrialFiguresJson;
  cycle: CycleJson | null;
  /** The filament lengths of the curve the muscle was placed on (µm; the calibration's key names). */
  filaments: FilamentsJson;
  /** Seconds of the unflagged strides spent at each sarcomere length: bin i covers start_um + i × bin_um. */
  sl_histogram: SlHistogramJson | null;
}

/** What an uncalibrated muscle's calibration is, in words. */
const BASELINE_METHOD = 'none: its first seconds assumed at the plateau middle';

export interface ActivationJson {
  shift: number;
  /** Activation used for samples that carry none (1 when the calibration gives none). */
  assumed: number;
  samples_with_activation: number;
}

export interface FilamentsJson {
  thick_um: number;
  thin_um: number;
  bare_zone_um: number;
  z_disc_um: number;
  steep_zero_um: number;
  steep_break_force: number;
}

export interface SlHistogramJson {
  start_um: number;
  bin_um: number;
  seconds: number[];
}

/** Bin width of the summary's time-at-length histogram, µm: fine enough to draw, small enough to read. */
export const SUMMARY_HISTOGRAM_BIN_UM = 0.01;

/** The trial's fine histogram, coarsened to SUMMARY_HISTOGRAM_BIN_UM and trimmed of empty ends. */
export function slHistogramJson(fine: Float64Array | undefined): SlHistogramJson | null {
  if (fine === undefined) return null;
  const factor = Math.max(1, Math.round(SUMMARY_HISTOGRAM_BIN_UM / HISTOGRAM_BIN_UM));
  const coarse: number[] = [];
  for (let i = 0; i < fine.length; i += factor) {
    let sum = 0;
    for (let j = i; j < Math.min(fine.length, i + factor); j++) sum += fine[j] as number;
    coarse.push(sum);
  }
  const first = coarse.findIndex((x) => x > 0);
  if (first === -1) return null;
  let last = coarse.length - 1;
  while (last > first && !((coarse[last] as number) > 0)) last--;
  const binUm = factor * HISTOGRAM_BIN_UM;
  return { start_um: Math.round(first * binUm * 1e6) / 1e6, bin_um: binUm, seconds: coarse.slice(first, last + 1) };
}

function filamentsJson(m: MuscleState): FilamentsJson {
  const g = m.curve.geometry;
  return {
    thick_um: g.thickUm,
    thin_um: g.thinUm,
    bare_zone_um: g.bareZoneUm,
    z_disc_um: g.zDiscUm,
    steep_zero_um: g.steepZeroUm,
    steep_break_force: g.steepBreakForce,
  };
}

/** A file a trial was read from: its path as given, its size and its SHA-256 (64 lower-case hex digits). */
export interface SourceFileJson {
  path: string;
  bytes: number;
  sha256: string;
}

export interface SummaryJson {
  format: 'lengthwise-summary';
  version: 1;
  source: string;
  /** Every file a trial description's trial read (the description first); absent for a trial file, which `source` names. */
  sources?: SourceFileJson[];
  subject: string | null;
  trial: string | null;
  calibrated: boolean;
  frames: {
    received: number;
    accepted: number;
    rejected: number;
    low_quality: number;
    gait_events: number;
    markers: number;
    headers: number;
    rejected_by_reason: Record<string, number>;
  };
  muscles: Record<string, MuscleJson>;
  warnings: string[];
  ended: boolean;
}

/** JSON has no NaN: an unknown figure is null. */
function num(x: number | undefined): number | null {
  return x !== undefined && Number.isFinite(x) ? x : null;
}

type Stretch = Pick<StrideSummary, 'startS' | 'endS' | 'slMinUm' | 'slMaxUm' | 'slMeanUm' | 'regionFraction' | 'forceMean' | 'gapS' | 'sampleCount'> &
  Partial<SegmentFigures>;

/** Time covered by samples in a stretch: the weight of its means and fractions in the trial figures. */
function coveredS(s: Stretch): number {
  return Math.max(0, s.endS - s.startS - s.gapS);
}

function probabilityJson(p: RegionProbabilityFigures | null | undefined): Pick<FiguresJson, 'region_probability' | 'region_probability_90'> {
  if (p === null || p === undefined) return {};
  const expected = {} as Record<RegionKey, number | null>;
  const interval = {} as RegionIntervalJson;
  for (const key of REGION_KEYS) {
    expected[key] = num(p.expected[key]);
    interval[key] = [num(p.low[key]), num(p.high[key])];
  }
  return { region_probability: expected, region_probability_90: interval };
}

/** What the trial figures need besides the strides: the muscle's histograms and curve, when known. */
export interface TrialContext {
  readonly curve: ForceLengthCurve;
  readonly spread: CountSpread;
  readonly histograms: { readonly stride: Float64Array; readonly stance: Float64Array; readonly swing: Float64Array } | undefined;
}

/** A time-weighted mean of the stretches that have a finite value. */
class FiniteMean {
  private sum = 0;
  private weight = 0;

  add(value: number | undefined, w: number): void {
    if (value === undefined || !Number.isFinite(value)) return;
    this.sum += value * w;
    this.weight += w;
  }

  value(): number | null {
    return this.weight > 0 ? num(this.sum / this.weight) : null;
  }
}

function aggregate(stretches: readonly Stretch[], histogram: Float64Array | undefined, context: TrialContext | undefined): TrialPhaseJson {
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  let vMin = Number.POSITIVE_INFINITY;
  let vMax = Number.NEGATIVE_INFINITY;
  let slSeconds = 0;
  let forceSeconds = 0;
  const forceLv = new FiniteMean();
  const forceTendon = new FiniteMean();
  let excursionSum = 0;
  let excursionCount = 0;
  let total = 0;
  let gap = 0;
  let duration = 0;
  let samples = 0;
  const regionS = zeroRegionRecord();
  for (const s of stretches) {
    const w = coveredS(s);
    gap += s.gapS;
    duration += s.endS - s.startS;
    samples += s.sampleCount;
    if (s.slMinUm < min) min = s.slMinUm;
    if (s.slMaxUm > max) max = s.slMaxUm;
    if (s.velocityMinMmS !== undefined && s.velocityMinMmS < vMin) vMin = s.velocityMinMmS;
    if (s.velocityMaxMmS !== undefined && s.velocityMaxMmS > vMax) vMax = s.velocityMaxMmS;
    const excursion = s.slMaxUm - s.slMinUm;
    if (Number.isFinite(excursion)) {
      excursionSum += excursion;
      excursionCount++;
    }
    if (w <= 0) continue;
    total += w;
    slSeconds += s.slMeanUm * w;
    forceSeconds += s.forceMean * w;
    forceLv.add(s.forceLvMean, w);
    forceTendon.add(s.forceTendonMean, w);
    for (const key of REGION_KEYS) regionS[key] += s.regionFraction[key] * w;
  }
  const regionFraction = zeroRegionRecord();
  if (total > 0) for (const key of REGION_KEYS) regionFraction[key] = regionS[key] / total;
  const probability =
    histogram !== undefined && context !== undefined ? histogramRegionProbability(context.curve, histogram, context.spread) : null;
  return {
    sl_min_um: num(min),
    sl_max_um: num(max),
    sl_mean_um: total > 0 ? num(slSeconds / total) : null,
    sl_p5_um: histogram !== undefined ? num(histogramQuantile(histogram, 0.05)) : null,
    sl_p95_um: histogram !== undefined ? num(histogramQuantile(histogram, 0.95)) : null,
    region_fraction: regionFraction,
    ...probabilityJson(probability),
    force_mean: total > 0 ? num(forceSeconds / total) : null,
    force_lv_mean: forceLv.value(),
    force_tendon_mean: forceTendon.value(),
    velocity_min_mm_s: num(vMin),
    velocity_max_mm_s: num(vMax),
    gap_s: gap,
    sample_count: samples,
    excursion_mean_um: excursionCount > 0 ? excursionSum / excursionCount : null,
    duration_s: duration,
  };
}

/**
 * Trial figures over complete strides, each weighted by the time its samples cover; flagged strides (too
 * much gap time) are counted but left out. Percentiles and region probabilities need the muscle's
 * histograms (`context`); without them they are null.
 */
export function trialFigures(list: StrideListView, context?: TrialContext): TrialFiguresJson {
  const strides = Array.isArray(list) ? (list as readonly StrideSummary[]) : [...list];
  const used = strides.filter((s) => s.flagged !== true);
  const stance: SegmentFigures[] = [];
  const swing: SegmentFigures[] = [];
  for (const s of used) {
    if (s.stance !== undefined && s.stance !== null && s.swing !== undefined && s.swing !== null) {
      stance.push(s.stance);
      swing.push(s.swing);
    }
  }
  const h = context?.histograms;
  return {
    stride_count: strides.length,
    flagged_count: strides.length - used.length,
    strides_used: used.length,
    phased_count: stance.length,
    ...aggregate(used, h?.stride, context),
    stance: stance.length > 0 ? aggregate(stance, h?.stance, context) : null,
    swing: swing.length > 0 ? aggregate(swing, h?.swing, context) : null,
  };
}

function figuresJson(s: Stretch): FiguresJson {
  return {
    sl_min_um: num(s.slMinUm),
    sl_max_um: num(s.slMaxUm),
    sl_mean_um: num(s.slMeanUm),
    sl_p5_um: num(s.slP5Um),
    sl_p95_um: num(s.slP95Um),
    region_fraction: { ...s.regionFraction },
    ...probabilityJson(s.regionProbability),
    force_mean: num(s.forceMean),
    force_lv_mean: num(s.forceLvMean),
    force_tendon_mean: num(s.forceTendonMean),
    velocity_min_mm_s: num(s.velocityMinMmS),
    velocity_max_mm_s: num(s.velocityMaxMmS),
    gap_s: s.gapS,
    sample_count: s.sampleCount,
  };
}

function phaseJson(s: SegmentFigures | null | undefined): PhaseJson | null {
  if (s === null || s === undefined) return null;
  return { start_s: s.startS, end_s: s.endS, duration_s: s.endS - s.startS, excursion_um: num(s.excursionUm), ...figuresJson(s) };
}

function strideJson(s: StrideSummary): StrideJson {
  const durationS = s.endS - s.startS;
  return {
    index: s.index,
    start_s: s.startS,
    end_s: s.endS,
    duration_s: durationS,
    excursion_um: num(s.excursionUm ?? s.slMaxUm - s.slMinUm),
    gap_fraction: durationS > 0 ? s.gapS / durationS : 0,
    flagged: s.flagged === true,
    ...figuresJson(s),
    stance: phaseJson(s.stance),
    swing: phaseJson(s.swing),
  };
}

function cycleJson(m: MuscleState): CycleJson | null {
  const c = m.cycle;
  if (c === undefined || c.strideCount === 0) return null;
  const percent: number[] = [];
  for (let p = 0; p < CYCLE_POINTS; p++) percent.push(p);
  return {
    percent,
    sl_mean_um: Array.from(c.slMeanUm, (x) => num(x)),
    sl_sd_um: cycleSd(c).map((x) => num(x)),
    stride_count: c.strideCount,
  };
}

function muscleJson(m: MuscleState): MuscleJson {
  const spread = spreadOf(m);
  // Rebuilt from the compact list once, for both the stride list and the trial figures.
  const strides = m.strides.slice();
  return {
    species: m.species,
    side: m.side,
    side_source: m.sideSource,
    sarcomeres_in_series: num(m.sarcomeresInSeries),
    sarcomeres_in_series_relative_sd: spread.relativeSd,
    sarcomeres_in_series_distribution: spread.shape,
    calibration_source: m.calibrationSource,
    calibration_method:
      m.calibrationMethod == null ? null : m.calibrationSource === 'baseline' ? BASELINE_METHOD : METHOD_LABEL[m.calibrationMethod],
    calibration_provenance: m.provenance == null ? null : provenanceJson(m.provenance),
    shape: m.shape ?? 'geometric',
    stride_start: m.segmentation == null ? null : m.segmentation === 'estimated' ? 'fascicle_length_minimum' : 'foot_strike',
    activation:
      (m.activationShift ?? 0) > 0
        ? { shift: m.activationShift ?? 0, assumed: Number.isNaN(m.activation ?? Number.NaN) ? 1 : (m.activation ?? 1), samples_with_activation: m.activationSamples ?? 0 }
        : null,
    segmentation: m.segmentation ?? null,
    strides: strides.map(strideJson),
    trial: trialFigures(strides, { curve: m.curve, spread, histograms: m.trialHistograms }),
    cycle: cycleJson(m),
    filaments: filamentsJson(m),
    sl_histogram: slHistogramJson(m.trialHistograms?.stride),
  };
}

/** The summary of a trial, every figure rounded to its unit's precision (src/output/output-precision.ts). */
/** What a summary says besides the trial's state. */
export interface SummaryExtras {
  /** The files a trial description's trial read. */
  readonly sources?: readonly SourceFileJson[] | null | undefined;
}

export function summaryJson(state: TrialState, extras: SummaryExtras = {}): SummaryJson {
  // Own properties for every name, __proto__ included (an assignment would set the object's prototype).
  const muscles: Record<string, MuscleJson> = Object.fromEntries([...state.muscles].map(([name, m]) => [name, muscleJson(m)]));
  const f = state.frames;
  return roundFigures<SummaryJson>({
    format: 'lengthwise-summary',
    version: 1,
    source: state.source,
    ...(extras.sources != null ? { sources: extras.sources.map((x) => ({ path: x.path, bytes: x.bytes, sha256: x.sha256 })) } : {}),
    subject: state.subject,
    trial: state.trial,
    calibrated: state.calibrated,
    frames: {
      received: f.received,
      accepted: f.accepted,
      rejected: f.rejected,
      low_quality: f.lowQuality,
      gait_events: f.gaitEvents,
      markers: f.markers,
      headers: f.headers,
      rejected_by_reason: { ...f.rejectedByReason },
    },
    muscles,
    warnings: [...state.warnings],
    ended: state.ended,
  });
}
