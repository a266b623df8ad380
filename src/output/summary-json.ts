/** The `--summary FILE.json` contract (lengthwise-summary, version 1), built from a TrialState. */
import { REGION_KEYS, zeroRegionRecord, type RegionKey } from '../model/regions.ts';
import type { MuscleState, StrideSummary, TrialState } from '../state.ts';

export interface StrideJson {
  index: number;
  start_s: number;
  end_s: number;
  sl_min_um: number | null;
  sl_max_um: number | null;
  sl_mean_um: number | null;
  region_fraction: Record<RegionKey, number>;
  force_mean: number | null;
  gap_s: number;
  sample_count: number;
}

export interface TrialFiguresJson {
  stride_count: number;
  sl_min_um: number | null;
  sl_max_um: number | null;
  sl_mean_um: number | null;
  region_fraction: Record<RegionKey, number>;
  force_mean: number | null;
}

export interface MuscleJson {
  species: string;
  side: string | null;
  side_source: string | null;
  sarcomeres_in_series: number | null;
  calibration_source: string | null;
  strides: StrideJson[];
  trial: TrialFiguresJson;
}

export interface SummaryJson {
  format: 'lengthwise-summary';
  version: 1;
  source: string;
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
function num(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

/** Time covered by samples in a stride: the weight of its means and fractions in the trial figures. */
function coveredS(s: StrideSummary): number {
  return Math.max(0, s.endS - s.startS - s.gapS);
}

/** Trial figures over complete strides, each weighted by the time its samples cover. */
export function trialFigures(strides: readonly StrideSummary[]): TrialFiguresJson {
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  let slSeconds = 0;
  let forceSeconds = 0;
  let total = 0;
  const regionS = zeroRegionRecord();
  for (const s of strides) {
    const w = coveredS(s);
    if (s.slMinUm < min) min = s.slMinUm;
    if (s.slMaxUm > max) max = s.slMaxUm;
    if (w <= 0) continue;
    total += w;
    slSeconds += s.slMeanUm * w;
    forceSeconds += s.forceMean * w;
    for (const key of REGION_KEYS) regionS[key] += s.regionFraction[key] * w;
  }
  const regionFraction = zeroRegionRecord();
  if (total > 0) for (const key of REGION_KEYS) regionFraction[key] = regionS[key] / total;
  return {
    stride_count: strides.length,
    sl_min_um: num(min),
    sl_max_um: num(max),
    sl_mean_um: total > 0 ? num(slSeconds / total) : null,
    region_fraction: regionFraction,
    force_mean: total > 0 ? num(forceSeconds / total) : null,
  };
}

function strideJson(s: StrideSummary): StrideJson {
  return {
    index: s.index,
    start_s: s.startS,
    end_s: s.endS,
    sl_min_um: num(s.slMinUm),
    sl_max_um: num(s.slMaxUm),
    sl_mean_um: num(s.slMeanUm),
    region_fraction: { ...s.regionFraction },
    force_mean: num(s.forceMean),
    gap_s: s.gapS,
    sample_count: s.sampleCount,
  };
}

function muscleJson(m: MuscleState): MuscleJson {
  return {
    species: m.species,
    side: m.side,
    side_source: m.sideSource,
    sarcomeres_in_series: num(m.sarcomeresInSeries),
    calibration_source: m.calibrationSource,
    strides: m.strides.map(strideJson),
    trial: trialFigures(m.strides),
  };
}

export function summaryJson(state: TrialState): SummaryJson {
  const muscles: Record<string, MuscleJson> = {};
  for (const [name, m] of state.muscles) muscles[name] = muscleJson(m);
  const f = state.frames;
  return {
    format: 'lengthwise-summary',
    version: 1,
    source: state.source,
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
  };
}
