/**
 * Copies the few numbers the dashboard shows out of the TrialState the pipeline mutates in place, and
 * keeps the dashboard's own short memory (sparkline ring buffers, rates, how long a muscle has been
 * silent or of low quality). Pure apart from the tracker it is given; no React, no RxJS.
 */
import { plateauMiddleUm, type ForceLengthCurve } from '../../model/geometry.ts';
import { optimalLengthFactor } from '../../model/muscle-model.ts';
import type { RegionKey } from '../../model/regions.ts';
import type { Species } from '../../model/species.ts';
import type { RejectReason } from '../../trial/reasons.ts';
import type { Side } from '../../trial/records.ts';
import type { MuscleState, StrideSummary, TrialState } from '../../trial/state.ts';
import {
  BASELINE_SHIFT_HOLD_STRIDES,
  baselineShiftAlert,
  connectionAlert,
  implausibleLengthAlert,
  lowQualityAlert,
  noSamplesAlerts,
  sortAlerts,
  streamErrorAlert,
  uncalibratedAlert,
  type Alert,
} from './alerts.ts';
import type { RunStatus } from '../../trial/run-status.ts';
import { calibrationKnown } from '../../trial/calibration-known.ts';

/** How many sarcomere lengths each muscle's sparkline remembers (about 10 s at the frame rate). */
export const HISTORY_SIZE = 160;
/** How many completed strides the view keeps for the stride table. */
export const STRIDES_KEPT = 8;
/** Wall-time window over which samples per second are counted. */
export const RATE_WINDOW_MS = 2000;

export interface SampleView {
  readonly tS: number;
  readonly fascicleMm: number;
  readonly smoothMm: number;
  readonly pennationDeg: number;
  readonly quality: number;
  readonly lowQuality: boolean;
  readonly velocityMmS: number;
  readonly sarcomereUm: number;
  readonly force: number;
  /** Force capacity from length × velocity, 0–1.5; NaN when the model gives none. */
  readonly forceLv: number;
  readonly region: RegionKey | null;
  readonly strideIndex: number;
}

export interface RangeView {
  readonly index: number;
  readonly slMinUm: number;
  readonly slMaxUm: number;
}

export interface MuscleView {
  readonly name: string;
  readonly side: Side | null;
  readonly sideSource: 'declared' | 'assumed' | null;
  readonly species: Species;
  readonly curve: ForceLengthCurve;
  readonly calibrationSource: string | null;
  /** The calibration's method (e.g. "architecture_prior"); null until known. */
  readonly calibrationMethod: string | null;
  /** Where the optimum lies at the latest sample's activation, when the optimal length shifts with activation. */
  readonly optimum: { readonly um: number; readonly activation: number } | null;
  readonly latest: SampleView | null;
  /** The stride in progress (null before the first foot strike or before any length is known). */
  readonly current: RangeView | null;
  /** The last completed stride. */
  readonly previous: RangeView | null;
  /** The last completed strides, oldest first (at most STRIDES_KEPT); the same array until a stride completes. */
  readonly strides: readonly StrideSummary[];
  readonly strideCount: number;
  /** Recent sarcomere lengths, oldest first, one per displayed frame with a new sample. */
  readonly history: readonly number[];
  /** Device time the current run of low-quality samples began; null when quality is good. */
  readonly lowSinceS: number | null;
  /** Wall milliseconds since this muscle's newest sample arrived. */
  readonly lastSampleAgeMs: number;
  /** The latest sample's probability of each region (calibration uncertainty); null when none is given. */
  readonly regionProbability: Readonly<Record<RegionKey, number>> | null;
  /** Strides estimated from the fascicle signal rather than found from foot strikes. */
  readonly stridesEstimated: boolean;
}

/** L0 at the latest sample's activation (its own, else the calibration's, else 1); null when the shift is off. */
function optimumOf(m: MuscleState): MuscleView['optimum'] {
  const shift = m.activationShift ?? 0;
  if (!(shift > 0)) return null;
  const own = m.latest?.activation ?? Number.NaN;
  const assumed = m.activation ?? Number.NaN;
  const activation = !Number.isNaN(own) ? own : !Number.isNaN(assumed) ? assumed : 1;
  return { um: plateauMiddleUm(m.curve) * optimalLengthFactor(activation, shift), activation };
}

export interface TrialView {
  readonly source: string;
  readonly subject: string | null;
  readonly trial: string | null;
  /**
   * true: every muscle has a calibration from a file, the header or a capture; false: one runs on the
   * assumed baseline; null: not known yet (no state, no muscle, or a muscle whose calibration has not come).
   */
  readonly calibrated: boolean | null;
  readonly ended: boolean;
  readonly received: number;
  readonly accepted: number;
  readonly lowQuality: number;
  readonly rejected: number;
  readonly topReason: { readonly reason: RejectReason; readonly count: number } | null;
  /** Accepted samples per wall second over the last RATE_WINDOW_MS; NaN until measurable. */
  readonly samplesPerS: number;
  /** lastTS − firstTS, device seconds. */
  readonly elapsedS: number;
  readonly lastTS: number;
  readonly warnings: readonly string[];
  readonly muscles: readonly MuscleView[];
  /** The pipeline's error, when it failed. */
  readonly error: string | null;
  readonly wallMs: number;
}

interface MuscleMemory {
  lastTS: number;
  lastSampleMs: number;
  lowSinceS: number | null;
  readonly history: Float64Array;
  head: number;
  count: number;
  /** The strides the kept ones were read from, and how many there were: strides are only ever appended. */
  stridesOf: unknown;
  strideCount: number;
  /** The last STRIDES_KEPT strides, read once per completed stride (so the same array while none completes). */
  kept: readonly StrideSummary[];
  previous: RangeView | null;
}

/** The dashboard's own memory across frames. One per mounted dashboard. */
export interface Tracker {
  readonly muscles: Map<string, MuscleMemory>;
  readonly rate: { ms: number; accepted: number }[];
}

export function createTracker(): Tracker {
  return { muscles: new Map(), rate: [] };
}

function memoryOf(tracker: Tracker, name: string, nowMs: number): MuscleMemory {
  let memory = tracker.muscles.get(name);
  if (memory === undefined) {
    memory = { lastTS: Number.NaN, lastSampleMs: nowMs, lowSinceS: null, history: new Float64Array(HISTORY_SIZE),
      head: 0,
      count: 0,
      stridesOf: null,
      strideCount: 0,
      kept: [],
      previous: null,
    };
    tracker.muscles.set(name, memory);
  }
  return memory;
}

/** The muscle's last strides, read again only when one has completed since the last frame. */
function keptStrides(memory: MuscleMemory, strides: MuscleState['strides']): void {
  if (strides === memory.stridesOf && strides.length === memory.strideCount) return;
  memory.stridesOf = strides;
  memory.strideCount = strides.length;
  memory.kept = strides.slice(-STRIDES_KEPT);
  const last = memory.kept.at(-1);
  memory.previous = last === undefined ? null : { index: last.index, slMinUm: last.slMinUm, slMaxUm: last.slMaxUm };
}

function historyOf(memory: MuscleMemory): number[] {
  const out: number[] = [];
  for (let i = memory.count; i > 0; i--) {
    out.push(memory.history[(memory.head - i + HISTORY_SIZE) % HISTORY_SIZE] ?? Number.NaN);
  }
  return out;
}

function measureRate(tracker: Tracker, nowMs: number, accepted: number): number {
  const points = tracker.rate;
  points.push({ ms: nowMs, accepted });
  while (points.length > 2 && (points[1]?.ms ?? nowMs) <= nowMs - RATE_WINDOW_MS) points.shift();
  const oldest = points[0];
  if (oldest === undefined) return Number.NaN;
  const spanMs = nowMs - oldest.ms;
  if (spanMs < 250) return Number.NaN;
  return ((accepted - oldest.accepted) * 1000) / spanMs;
}

function topReason(byReason: TrialState['frames']['rejectedByReason']): TrialView['topReason'] {
  let best: TrialView['topReason'] = null;
  for (const [reason, count] of Object.entries(byReason) as [RejectReason, number | undefined][]) {
    if (count !== undefined && count > 0 && (best === null || count > best.count)) best = { reason, count };
  }
  return best;
}

/**
 * One frame: reads `state` (never writes it), updates the tracker's memory, returns plain copies.
 * `nowMs` is wall time from the dashboard's scheduler; `error` is the pipeline's error message, if any.
 */
export function observeTrial(tracker: Tracker, state: TrialState | null, nowMs: number, error: string | null = null): TrialView {
  if (state === null) {
    return {
      source: '',
      subject: null,
      trial: null,
      calibrated: null,
      ended: false,
      received: 0,
      accepted: 0,
      lowQuality: 0,
      rejected: 0,
      topReason: null,
      samplesPerS: measureRate(tracker, nowMs, 0),
      elapsedS: Number.NaN,
      lastTS: Number.NaN,
      warnings: [],
      muscles: [],
      error,
      wallMs: nowMs,
    };
  }
  const muscles: MuscleView[] = [];
  for (const m of state.muscles.values()) {
    const memory = memoryOf(tracker, m.name, nowMs);
    keptStrides(memory, m.strides);
    const s = m.latest;
    let latest: SampleView | null = null;
    if (s !== null) {
      if (s.tS !== memory.lastTS) {
        memory.lastTS = s.tS;
        memory.lastSampleMs = nowMs;
        if (Number.isFinite(s.sarcomereUm)) {
          memory.history[memory.head] = s.sarcomereUm;
          memory.head = (memory.head + 1) % HISTORY_SIZE;
          memory.count = Math.min(memory.count + 1, HISTORY_SIZE);
        }
        if (s.lowQuality) memory.lowSinceS ??= s.tS;
        else memory.lowSinceS = null;
      }
      latest = {
        tS: s.tS,
        fascicleMm: s.fascicleMm,
        smoothMm: s.smoothMm,
        pennationDeg: s.pennationDeg,
        quality: s.quality,
        lowQuality: s.lowQuality,
        velocityMmS: s.velocityMmS,
        sarcomereUm: s.sarcomereUm,
        force: s.force,
        forceLv: s.forceLv,
        region: s.region,
        strideIndex: s.strideIndex,
      };
    }
    muscles.push({
      name: m.name,
      side: m.side,
      sideSource: m.sideSource,
      species: m.species,
      curve: m.curve,
      calibrationSource: m.calibrationSource,
      calibrationMethod: m.calibrationMethod ?? null,
      optimum: optimumOf(m),
      latest,
      current: m.current === null ? null : { index: m.current.index, slMinUm: m.current.slMinUm, slMaxUm: m.current.slMaxUm },
      previous: memory.previous,
      strides: memory.kept,
      strideCount: memory.strideCount,
      history: historyOf(memory),
      lowSinceS: memory.lowSinceS,
      lastSampleAgeMs: nowMs - memory.lastSampleMs,
      regionProbability: m.regionProbability == null ? null : { ...m.regionProbability },
      stridesEstimated: m.segmentation === 'estimated',
    });
  }
  return {
    source: state.source,
    subject: state.subject,
    trial: state.trial,
    calibrated: calibrationKnown(state),
    ended: state.ended,
    received: state.frames.received,
    accepted: state.frames.accepted,
    lowQuality: state.frames.lowQuality,
    rejected: state.frames.rejected,
    topReason: topReason(state.frames.rejectedByReason),
    samplesPerS: measureRate(tracker, nowMs, state.frames.accepted),
    elapsedS: state.lastTS - state.firstTS,
    lastTS: state.lastTS,
    warnings: state.warnings.slice(-4),
    muscles,
    error,
    wallMs: nowMs,
  };
}

/** Every alert the view and the status call for, critical first. */
export function detectAlerts(view: TrialView, status: RunStatus, canCalibrate: boolean): Alert[] {
  const found: (Alert | null)[] = [
    streamErrorAlert(view.error),
    connectionAlert(status.connection),
    uncalibratedAlert(view.calibrated !== false, view.muscles.length, canCalibrate),
  ];
  const ages = new Map(view.muscles.map((m) => [m.name, m.lastSampleAgeMs] as const));
  found.push(...noSamplesAlerts(ages, view.ended, status.connection));
  for (const m of view.muscles) {
    found.push(lowQualityAlert(m.name, m.lowSinceS, m.latest?.tS ?? Number.NaN));
    found.push(implausibleLengthAlert(m.name, m.latest?.sarcomereUm ?? Number.NaN, status.plausibleUm));
    found.push(baselineShiftAlert(m.name, m.strides.slice(-(BASELINE_SHIFT_HOLD_STRIDES + 1))));
  }
  return sortAlerts(found.filter((a): a is Alert => a !== null));
}
