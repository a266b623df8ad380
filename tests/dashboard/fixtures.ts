/**
 * TrialState fixtures for the dashboard's tests: real curves from src/model, samples from makeSample,
 * filled in as the pipeline's stages would. Invented numbers, for tests only.
 */
import { geometricForce, regionAt, type ForceLengthCurve } from '../../src/model/geometry.ts';
import { zeroRegionRecord, type RegionKey } from '../../src/model/regions.ts';
import { speciesCurve, type Species } from '../../src/model/species.ts';
import { makeSample, type Side } from '../../src/trial/records.ts';
import { emptyFrameCounts, type CalibrationSource, type MuscleState, type StrideSummary, type TrialState } from '../../src/trial/state.ts';
import type { Observer } from 'rxjs';
import type { Run, Tone } from '../../src/dashboard/view/curve-drawing.ts';

export interface MuscleOptions {
  readonly side?: Side | null;
  readonly species?: Species;
  readonly curve?: ForceLengthCurve;
  readonly calibrationSource?: CalibrationSource | null;
  readonly sarcomeresInSeries?: number;
}

export function makeMuscle(name: string, options: MuscleOptions = {}): MuscleState {
  const species = options.species ?? 'human';
  return {
    name,
    side: options.side === undefined ? 'left' : options.side,
    sideSource: options.side === null ? null : 'declared',
    species,
    curve: options.curve ?? speciesCurve(species),
    sarcomeresInSeries: options.sarcomeresInSeries ?? 20_000,
    calibrationSource: options.calibrationSource === undefined ? 'file' : options.calibrationSource,
    latest: null,
    current: null,
    strides: [],
  };
}

export function makeTrialState(muscles: readonly MuscleState[] = [], source = 'replays/fixture-walk.ndjson'): TrialState {
  return {
    source,
    subject: 'fixture',
    trial: 'walk-1',
    calibrated: muscles.every((m) => m.calibrationSource === 'file' || m.calibrationSource === 'header'),
    frames: emptyFrameCounts(),
    muscles: new Map(muscles.map((m) => [m.name, m])),
    warnings: [],
    lastTS: Number.NaN,
    firstTS: Number.NaN,
    ended: false,
  };
}

export interface SampleOptions {
  readonly tS: number;
  readonly sarcomereUm: number;
  readonly quality?: number;
  readonly lowQuality?: boolean;
  readonly pennationDeg?: number;
  readonly velocityMmS?: number;
  readonly strideIndex?: number;
  /** Force capacity from length × velocity; NaN (the default) as when the model gives none. */
  readonly forceLv?: number;
}

/** Gives `muscle` a new latest sample, enriched as the stages would, and counts it; mutates in place. */
export function pushSample(state: TrialState, muscle: string, options: SampleOptions): void {
  const m = state.muscles.get(muscle);
  if (m === undefined) throw new Error(`fixture: no muscle "${muscle}" in the state; add it with makeMuscle first`);
  const fascicleMm = (options.sarcomereUm * m.sarcomeresInSeries) / 1000;
  const s = makeSample(options.tS, muscle, fascicleMm, options.pennationDeg ?? 18, options.quality ?? 0.95, state.frames.received + 1);
  s.lowQuality = options.lowQuality ?? false;
  s.smoothMm = fascicleMm;
  s.velocityMmS = options.velocityMmS ?? 0;
  s.sarcomereUm = options.sarcomereUm;
  s.force = geometricForce(m.curve, options.sarcomereUm);
  s.region = regionAt(m.curve, options.sarcomereUm);
  s.forceLv = options.forceLv ?? Number.NaN;
  s.strideIndex = options.strideIndex ?? (m.current?.index ?? -1);
  m.latest = s;
  if (m.current !== null) {
    m.current.slMinUm = Math.min(m.current.slMinUm, options.sarcomereUm);
    m.current.slMaxUm = Math.max(m.current.slMaxUm, options.sarcomereUm);
  }
  state.frames.received += 1;
  state.frames.accepted += 1;
  if (s.lowQuality) state.frames.lowQuality += 1;
  if (!Number.isFinite(state.firstTS)) state.firstTS = options.tS;
  state.lastTS = Math.max(Number.isFinite(state.lastTS) ? state.lastTS : options.tS, options.tS);
}

export interface StrideOptions {
  readonly slMinUm: number;
  readonly slMaxUm: number;
  readonly slMeanUm?: number;
  /** Partial fractions; the rest are 0. */
  readonly regionFraction?: Partial<Record<RegionKey, number>>;
  readonly durationS?: number;
}

/** Appends a completed stride to `muscle` and starts the next one. */
export function completeStride(state: TrialState, muscle: string, options: StrideOptions): StrideSummary {
  const m = state.muscles.get(muscle);
  if (m === undefined) throw new Error(`fixture: no muscle "${muscle}" in the state; add it with makeMuscle first`);
  const index = m.strides.length;
  const last = m.strides.at(m.strides.length - 1);
  const startS = last === undefined ? 0 : last.endS;
  const endS = startS + (options.durationS ?? 1.1);
  const stride: StrideSummary = {
    index,
    startS,
    endS,
    slMinUm: options.slMinUm,
    slMaxUm: options.slMaxUm,
    slMeanUm: options.slMeanUm ?? (options.slMinUm + options.slMaxUm) / 2,
    regionFraction: { ...zeroRegionRecord(), ...(options.regionFraction ?? { plateau: 1 }) },
    forceMean: 0.9,
    gapS: 0,
    sampleCount: 110,
  };
  // Hand-made states hold their strides in a plain array (makeMuscle).
  const strides = m.strides;
  if (!Array.isArray(strides)) throw new Error(`fixture: the strides of "${muscle}" are not a plain array; make the muscle with makeMuscle`);
  strides.push(stride);
  m.current = { index: index + 1, startS: endS, slMinUm: Number.POSITIVE_INFINITY, slMaxUm: Number.NEGATIVE_INFINITY };
  return stride;
}

/** Starts a stride in progress with the given running range. */
export function startStride(state: TrialState, muscle: string, range: { slMinUm: number; slMaxUm: number }): void {
  const m = state.muscles.get(muscle);
  if (m === undefined) throw new Error(`fixture: no muscle "${muscle}" in the state; add it with makeMuscle first`);
  const index = m.strides.length;
  m.current = { index, startS: 0, slMinUm: range.slMinUm, slMaxUm: range.slMaxUm };
}

/** A two-muscle walking state with a few strides, the shape most screen tests start from. */
export function walkingState(): TrialState {
  const state = makeTrialState([makeMuscle('calf', { side: 'left' }), makeMuscle('thigh', { side: 'right' })]);
  for (let i = 0; i < 4; i++) {
    completeStride(state, 'calf', { slMinUm: 2.3 + i * 0.01, slMaxUm: 2.95, regionFraction: { shallow_ascending: 0.3, plateau: 0.55, descending: 0.15 } });
    completeStride(state, 'thigh', { slMinUm: 2.5, slMaxUm: 3.3, regionFraction: { plateau: 0.2, descending: 0.8 } });
  }
  pushSample(state, 'calf', { tS: 5, sarcomereUm: 2.71, velocityMmS: -12.3 });
  pushSample(state, 'thigh', { tS: 5, sarcomereUm: 3.05, velocityMmS: 20 });
  state.firstTS = 0;
  return state;
}

/** A trial that breaks off upstream: the walking state, then the stream failing with this message. */
export function walkThenFail(state$: Observer<TrialState>, message: string): void {
  state$.next(walkingState());
  state$.error(new Error(message));
}

/** A drawn row as runs of text, each pair its text and its tone. */
export function toneRuns(...pairs: readonly (readonly [text: string, tone: Tone])[]): Run[] {
  return pairs.map(([text, tone]) => ({ text, tone }));
}
