/**
 * The synthetic gait generator: a deterministic, lazily produced lengthwise-stream trial and its exact
 * ground truth (true sarcomere length at any time, true foot strikes, true per-stride extremes), so
 * end-to-end tests can compare the tool's output with what was put in.
 *
 * Gait is one continuous phase φ(t) that grows by 1 per stride; stride periods vary a little from stride
 * to stride. The left foot strikes where φ is a whole number, the right half a stride later. A muscle's
 * true sarcomere length is its trajectory at its own side's phase, with a small smooth stride-to-stride
 * change of amplitude and offset. Fascicle length = true sarcomere length × sarcomeres in series / 1000
 * + noise (rounded to 1 µm on the wire).
 */
import type { GaitEventName, Side } from '../trial/records.ts';
import type { RejectReason } from '../trial/reasons.ts';
import { createPrng, deriveSeed, type Prng } from './prng.ts';
import { compileTrajectory, type Trajectory, type TrajectorySpec } from './trajectory.ts';
import { badLineCsv, badLineNdjson, ORDER_REASONS, roundTime } from './bad-lines.ts';
import { goldenSection } from './golden-section.ts';
import {
  STREAM_FORMAT,
  STREAM_VERSION,
  type WireEvent,
  type WireHeader,
  type WireItem,
  type WireMuscleCalibration,
  type WireSample,
} from './wire.ts';

export type Scenario = 'walk' | 'run';
export const SCENARIOS: readonly Scenario[] = ['walk', 'run'];

export interface MuscleSpec {
  readonly name: string;
  readonly side: Side;
  /** The truth: fascicle length (mm) = sarcomere length (µm) × this / 1000. */
  readonly sarcomeresInSeries: number;
  /** True sarcomere length over the gait cycle of the muscle's side (phase 0 = its foot strike). */
  readonly trajectory: TrajectorySpec;
  /** Distance between the aponeuroses (mm); pennation follows sin(angle) = thickness / fascicle length. */
  readonly thicknessMm: number;
  /** SD of the fascicle-length measurement noise (mm). */
  readonly noiseSdMm: number;
  /** SD of the pennation-angle measurement noise (degrees). */
  readonly pennationSdDeg: number;
}

export interface StrideVariation {
  /** Coefficient of variation of the stride period. */
  readonly periodCv: number;
  /** Coefficient of variation of each stride's excursion about the mean. */
  readonly amplitudeCv: number;
  /** SD of each stride's shift of the whole trajectory (µm). */
  readonly offsetSdUm: number;
}

/**
 * A stretch of lost tracking. `low_quality`: samples keep coming with quality near 0 and a wandering,
 * wrong fascicle length; `missing`: no samples at all.
 */
export interface DropoutSpec {
  readonly muscle: string;
  readonly fromS: number;
  readonly toS: number;
  readonly mode: 'low_quality' | 'missing';
  /** Repeat the window every this many seconds (for endless simulations). */
  readonly repeatEveryS?: number;
}

/** A bad line, emitted after the first sample tick at or after `atS` (for copies: a tick the muscle has a sample). */
export interface BadLineSpec {
  readonly atS: number;
  readonly reason: RejectReason;
  /** The muscle the line pretends to be about; default the first muscle. */
  readonly muscle?: string;
}

export interface MarkerSpec {
  readonly atS: number;
  readonly text: string;
}

export interface HeaderSpec {
  readonly subject?: string;
  readonly trial?: string;
  /** Muscles whose calibration (the true sarcomeres in series) the header carries. */
  readonly calibrate: 'all' | readonly string[];
}

export interface TrialSpec {
  readonly scenario: Scenario;
  readonly seed: number;
  readonly rateHz: number;
  /** Device time of the first sample tick (s). */
  readonly startS: number;
  /** Length of the trial (s); Infinity for an endless stream. */
  readonly durationS: number;
  /** Mean stride period (s). */
  readonly strideS: number;
  /** Fraction of a stride the foot is on the ground (toe-off at this phase after its foot strike). */
  readonly stanceFraction: number;
  /** Left-side gait phase at the first tick (0–1). */
  readonly initialPhase: number;
  readonly strideVariation: StrideVariation;
  readonly muscles: readonly MuscleSpec[];
  readonly dropouts: readonly DropoutSpec[];
  readonly badLines: readonly BadLineSpec[];
  readonly markers: readonly MarkerSpec[];
  /** null: no header line. */
  readonly header: HeaderSpec | null;
  /** Length of a line_too_long line (characters). */
  readonly longLineChars: number;
}

export interface RecordsOptions {
  /** How bad lines are written, or left out. @default 'ndjson' */
  readonly badLines?: 'ndjson' | 'csv' | 'none';
  /** Yield the header first (when the spec has one). @default true */
  readonly header?: boolean;
}

/** One true stride of a muscle: from one foot strike of its side to the next. */
export interface TrueStride {
  readonly index: number;
  readonly startS: number;
  readonly endS: number;
  readonly slMinUm: number;
  readonly slMaxUm: number;
}

export interface GroundTruth {
  /** True sarcomere length (µm) of a muscle at a device time. */
  trueSarcomereUm(muscle: string, tS: number): number;
  /** True fascicle length (mm): true sarcomere length × sarcomeres in series / 1000. */
  trueFascicleMm(muscle: string, tS: number): number;
  /** Foot strikes of a side as written in the stream (s), up to the trial's end or `untilS`. */
  footStrikes(side: Side, untilS?: number): number[];
  toeOffs(side: Side, untilS?: number): number[];
  /**
   * Completed strides of a muscle (both ends inside the trial, or before `untilS`), 0-based from the first
   * foot strike of its side; extremes found numerically (a fine grid, then golden-section refinement).
   */
  strides(muscle: string, untilS?: number): TrueStride[];
  /** The dropout a muscle is in at a time, if any. */
  dropoutAt(muscle: string, tS: number): DropoutSpec['mode'] | null;
}

export interface GaitTrial {
  readonly spec: TrialSpec;
  readonly header: WireHeader | null;
  readonly truth: GroundTruth;
  /** Device time of sample tick i (s). */
  tickS(i: number): number;
  /** Number of sample ticks (Infinity for an endless trial). */
  readonly ticks: number;
  /** The stream, lazily; every call starts afresh and yields the same items. */
  records(options?: RecordsOptions): Generator<WireItem, void, undefined>;
}

/** Problems of a spec, as sentences; empty when it is usable. */
export function checkTrialSpec(spec: TrialSpec): string[] {
  const problems: string[] = [];
  if (!(spec.rateHz > 0 && spec.rateHz <= 10_000)) problems.push(`rate ${spec.rateHz} Hz: give a rate above 0 and at most 10000 Hz`);
  if (!(spec.durationS > 0)) problems.push(`duration ${spec.durationS} s: give a duration above 0 s (Infinity for endless)`);
  if (!Number.isFinite(spec.startS)) problems.push(`start ${spec.startS} s: give a finite start time`);
  if (!(spec.strideS >= 0.2 && spec.strideS <= 5)) problems.push(`stride period ${spec.strideS} s: give 0.2–5 s`);
  if (!(spec.stanceFraction > 0 && spec.stanceFraction < 1)) problems.push(`stance fraction ${spec.stanceFraction}: give a value strictly between 0 and 1`);
  if (!(spec.strideVariation.periodCv >= 0 && spec.strideVariation.periodCv <= 0.1)) problems.push('stride period CV: give 0–0.1');
  if (spec.muscles.length === 0) problems.push('no muscles: give at least one');
  const names = new Set<string>();
  for (const m of spec.muscles) {
    if (m.name.length === 0) problems.push('a muscle has an empty name: give every muscle a name');
    if (names.has(m.name)) problems.push(`muscle "${m.name}" appears twice: give each muscle once`);
    names.add(m.name);
    if (!(m.sarcomeresInSeries > 0)) problems.push(`muscle "${m.name}": sarcomeres in series must be above 0`);
    if (!(m.trajectory.maxUm > m.trajectory.minUm && m.trajectory.minUm > 0)) problems.push(`muscle "${m.name}": trajectory needs 0 < min < max`);
  }
  for (const d of spec.dropouts) {
    if (!names.has(d.muscle)) problems.push(`dropout for unknown muscle "${d.muscle}": use one of ${[...names].join(', ')}`);
    if (!(d.toS > d.fromS)) problems.push(`dropout ${d.fromS}–${d.toS} s: the end must come after the start`);
    if (d.repeatEveryS !== undefined && !(d.repeatEveryS > d.toS - d.fromS)) problems.push('dropout repeat period must be longer than the window');
  }
  for (const b of spec.badLines) {
    if (b.muscle !== undefined && !names.has(b.muscle)) problems.push(`bad line for unknown muscle "${b.muscle}"`);
  }
  return problems;
}

const SIDE_OFFSET: Readonly<Record<Side, number>> = { left: 0, right: 0.5 };

function clamp3(x: number): number {
  return x < -3 ? -3 : x > 3 ? 3 : x;
}

/** The strides of the whole-body gait phase, drawn lazily and kept (a few numbers per stride). */
class StrideTable {
  /** Time where φ = k. */
  private readonly start: number[] = [];
  private readonly period: number[] = [];
  private readonly amp: number[] = [];
  private readonly offset: number[] = [];
  private readonly prng: Prng;
  private cursor = 0;

  constructor(private readonly spec: TrialSpec) {
    this.prng = createPrng(deriveSeed(spec.seed, 1));
    this.push(spec.startS - spec.initialPhase * spec.strideS);
  }

  private push(startS: number): void {
    const v = this.spec.strideVariation;
    this.start.push(startS);
    this.period.push(this.spec.strideS * (1 + v.periodCv * clamp3(this.prng.gauss())));
    this.amp.push(1 + v.amplitudeCv * clamp3(this.prng.gauss()));
    this.offset.push(v.offsetSdUm * clamp3(this.prng.gauss()));
  }

  /** Makes sure stride k and k + 1 exist. */
  private ensureIndex(k: number): void {
    while (this.start.length < k + 2) {
      const last = this.start.length - 1;
      this.push((this.start[last] as number) + (this.period[last] as number));
    }
  }

  phaseAt(tS: number): number {
    let k = this.cursor;
    this.ensureIndex(k);
    if (tS < (this.start[k] as number)) {
      // Random access backwards: binary search over the strides drawn so far.
      let lo = 0;
      let hi = k;
      while (lo < hi) {
        const mid = (lo + hi + 1) >> 1;
        if ((this.start[mid] as number) <= tS) lo = mid;
        else hi = mid - 1;
      }
      k = lo;
    } else {
      while (tS >= (this.start[k + 1] as number)) {
        k++;
        this.ensureIndex(k);
      }
    }
    this.cursor = k;
    return k + (tS - (this.start[k] as number)) / (this.period[k] as number);
  }

  timeAtPhase(phase: number): number {
    const k = Math.max(0, Math.floor(phase));
    this.ensureIndex(k);
    return (this.start[k] as number) + (phase - k) * (this.period[k] as number);
  }

  /** Stride-to-stride amplitude and offset at a phase, blended smoothly from one stride to the next. */
  amplitudeAt(phase: number): number {
    return this.blendAt(this.amp, phase);
  }

  offsetAt(phase: number): number {
    return this.blendAt(this.offset, phase);
  }

  /** A per-stride value at a phase, blended from stride k to stride k + 1 by a smoothstep. */
  private blendAt(values: number[], phase: number): number {
    if (phase < 0) return values[0] as number;
    const k = Math.floor(phase);
    this.ensureIndex(k);
    const f = phase - k;
    const s = f * f * (3 - 2 * f);
    const v0 = values[k] as number;
    return v0 + ((values[k + 1] as number) - v0) * s;
  }
}

interface EventTemplate {
  readonly offset: number;
  readonly event: GaitEventName;
  readonly side: Side;
}

interface CompiledMuscle {
  readonly spec: MuscleSpec;
  readonly trajectory: Trajectory;
  readonly sideOffset: number;
  readonly dropouts: readonly DropoutSpec[];
  readonly nameJson: string;
}

function dropoutModeAt(dropouts: readonly DropoutSpec[], tS: number): DropoutSpec['mode'] | null {
  for (const d of dropouts) {
    if (tS < d.fromS) continue;
    const since = d.repeatEveryS === undefined ? tS - d.fromS : (tS - d.fromS) % d.repeatEveryS;
    if (since < d.toS - d.fromS) return d.mode;
  }
  return null;
}

/** The lowest (sign -1) or highest (sign 1) value of f on [a, b]: a grid of 1000, then golden-section refinement. */
function extremeOver(f: (t: number) => number, a: number, b: number, sign: 1 | -1): number {
  const steps = 1000;
  const dt = (b - a) / steps;
  let best = -Infinity;
  let bestAt = a;
  for (let j = 0; j <= steps; j++) {
    const t = a + dt * j;
    const v = sign * f(t);
    if (v > best) {
      best = v;
      bestAt = t;
    }
  }
  const x = goldenSection(f, Math.max(a, bestAt - dt), Math.min(b, bestAt + dt), sign, 50);
  return sign * Math.max(best, sign * f(x));
}

function round(x: number, perUnit: number): number {
  return Math.round(x * perUnit) / perUnit;
}

const RAD_TO_DEG = 180 / Math.PI;

/** Builds a trial; throws RangeError listing the problems of a spec that cannot be generated. */
export function createTrial(spec: TrialSpec): GaitTrial {
  const problems = checkTrialSpec(spec);
  if (problems.length > 0) throw new RangeError(`cannot generate this trial: ${problems.join('; ')}`);

  const table = new StrideTable(spec);
  const endS = spec.startS + spec.durationS;
  const ticks = Number.isFinite(spec.durationS) ? Math.round(spec.durationS * spec.rateHz) : Infinity;
  const tickS = (i: number): number => roundTime(spec.startS + i / spec.rateHz);

  const muscles: CompiledMuscle[] = spec.muscles.map((m) => ({
    spec: m,
    trajectory: compileTrajectory(m.trajectory),
    sideOffset: SIDE_OFFSET[m.side],
    dropouts: spec.dropouts.filter((d) => d.muscle === m.name),
    nameJson: JSON.stringify(m.name),
  }));
  const byName = new Map(muscles.map((m) => [m.spec.name, m]));
  const muscleOf = (name: string): CompiledMuscle => {
    const m = byName.get(name);
    if (m === undefined) throw new RangeError(`unknown muscle "${name}": this trial has ${[...byName.keys()].join(', ')}`);
    return m;
  };

  const sarcomereUm = (m: CompiledMuscle, tS: number): number => {
    const phase = table.phaseAt(tS);
    return (
      m.trajectory.meanUm +
      table.offsetAt(phase) +
      table.amplitudeAt(phase) * m.trajectory.deviationUmAt(phase - m.sideOffset)
    );
  };

  const templates: EventTemplate[] = [
    { offset: 0, event: 'foot_strike' as const, side: 'left' as const },
    { offset: 0.5, event: 'foot_strike' as const, side: 'right' as const },
    { offset: spec.stanceFraction, event: 'toe_off' as const, side: 'left' as const },
    { offset: (0.5 + spec.stanceFraction) % 1, event: 'toe_off' as const, side: 'right' as const },
  ].sort((a, b) => a.offset - b.offset);

  /** Gait events in time order, from the trial's start to its end (or untilS). */
  function* events(untilS: number): Generator<WireEvent, void, undefined> {
    const limit = Math.min(untilS, endS);
    for (let k = 0; ; k++) {
      for (const tpl of templates) {
        const t = round(table.timeAtPhase(k + tpl.offset), 1000);
        if (t >= limit) return;
        if (t >= spec.startS) yield { t, event: tpl.event, side: tpl.side };
      }
    }
  }

  const eventTimes = (event: GaitEventName, side: Side, untilS: number): number[] => {
    const out: number[] = [];
    for (const e of events(untilS)) if (e.event === event && e.side === side) out.push(e.t);
    return out;
  };

  const truth: GroundTruth = {
    trueSarcomereUm: (muscle, tS) => sarcomereUm(muscleOf(muscle), tS),
    trueFascicleMm: (muscle, tS) => {
      const m = muscleOf(muscle);
      return (sarcomereUm(m, tS) * m.spec.sarcomeresInSeries) / 1000;
    },
    footStrikes: (side, untilS = Infinity) => eventTimes('foot_strike', side, untilS),
    toeOffs: (side, untilS = Infinity) => eventTimes('toe_off', side, untilS),
    strides: (muscle, untilS = Infinity) => {
      const m = muscleOf(muscle);
      const strikes = eventTimes('foot_strike', m.spec.side, untilS);
      const out: TrueStride[] = [];
      for (let i = 0; i + 1 < strikes.length; i++) {
        const startS = strikes[i] as number;
        const stopS = strikes[i + 1] as number;
        const f = (t: number): number => sarcomereUm(m, t);
        out.push({
          index: i,
          startS,
          endS: stopS,
          slMinUm: extremeOver(f, startS, stopS, -1),
          slMaxUm: extremeOver(f, startS, stopS, 1),
        });
      }
      return out;
    },
    dropoutAt: (muscle, tS) => dropoutModeAt(muscleOf(muscle).dropouts, tS),
  };

  const header = spec.header === null ? null : buildHeader(spec, spec.header);

  function* records(options: RecordsOptions = {}): Generator<WireItem, void, undefined> {
    const badMode = options.badLines ?? 'ndjson';
    if (header !== null && options.header !== false) yield header;

    const noise = createPrng(deriveSeed(spec.seed, 2));
    const n = muscles.length;
    const last: (WireSample | null)[] = muscles.map(() => null);
    const sampledThisTick: boolean[] = muscles.map(() => false);
    const drift = new Float64Array(n);
    const wasLost: boolean[] = muscles.map(() => false);

    const eventIter = events(Infinity);
    let nextEvent = eventIter.next();
    const markers = [...spec.markers].sort((a, b) => a.atS - b.atS);
    let markerIdx = 0;
    const badLines = badMode === 'none' ? [] : [...spec.badLines].sort((a, b) => a.atS - b.atS);
    let badIdx = 0;
    const variants = new Map<RejectReason, number>();

    for (let i = 0; i < ticks; i++) {
      const t = tickS(i);
      while (!nextEvent.done && nextEvent.value.t <= t) {
        yield nextEvent.value;
        nextEvent = eventIter.next();
      }
      while (markerIdx < markers.length && (markers[markerIdx] as MarkerSpec).atS <= t) {
        const mk = markers[markerIdx++] as MarkerSpec;
        yield { t: Math.max(spec.startS, round(mk.atS, 1000)), marker: mk.text };
      }

      const phase = table.phaseAt(t);
      const amp = table.amplitudeAt(phase);
      const off = table.offsetAt(phase);
      for (let j = 0; j < n; j++) {
        const m = muscles[j] as CompiledMuscle;
        const ms = m.spec;
        sampledThisTick[j] = false;
        const mode = m.dropouts.length === 0 ? null : dropoutModeAt(m.dropouts, t);
        if (mode === 'missing') {
          wasLost[j] = true;
          continue;
        }
        const slUm = m.trajectory.meanUm + off + amp * m.trajectory.deviationUmAt(phase - m.sideOffset);
        const trueMm = (slUm * ms.sarcomeresInSeries) / 1000;
        let fascicleMm: number;
        let quality: number;
        if (mode === 'low_quality') {
          if (!wasLost[j]) drift[j] = 0;
          wasLost[j] = true;
          drift[j] = (drift[j] as number) + 0.6 * noise.gauss();
          fascicleMm = trueMm + (drift[j] as number) + 4 * ms.noiseSdMm * noise.gauss();
          quality = 0.02 + 0.1 * noise.next();
        } else {
          wasLost[j] = false;
          fascicleMm = trueMm + ms.noiseSdMm * noise.gauss();
          quality = 0.88 + 0.12 * noise.next();
        }
        const sinAngle = Math.min(1, ms.thicknessMm / trueMm);
        let pennationDeg = Math.asin(sinAngle) * RAD_TO_DEG + ms.pennationSdDeg * noise.gauss();
        pennationDeg = pennationDeg < 0.5 ? 0.5 : pennationDeg > 89.5 ? 89.5 : pennationDeg;
        const sample: WireSample = {
          t,
          muscle: ms.name,
          fascicle_mm: Math.max(0.001, round(fascicleMm, 1000)),
          pennation_deg: round(pennationDeg, 100),
          quality: round(quality, 1000),
        };
        last[j] = sample;
        sampledThisTick[j] = true;
        yield sample;
      }

      while (badIdx < badLines.length && (badLines[badIdx] as BadLineSpec).atS <= t) {
        const b = badLines[badIdx] as BadLineSpec;
        const j = b.muscle === undefined ? 0 : muscles.findIndex((m) => m.spec.name === b.muscle);
        // Copies wait for a tick where their muscle has a fresh sample to copy.
        if (ORDER_REASONS.includes(b.reason) && !sampledThisTick[j]) break;
        badIdx++;
        const variant = variants.get(b.reason) ?? 0;
        variants.set(b.reason, variant + 1);
        const ctx = {
          tS: roundTime(t + 0.5 / spec.rateHz),
          muscle: (muscles[j] as CompiledMuscle).spec.name,
          last: last[j] ?? null,
          variant,
          longLineChars: spec.longLineChars,
        };
        const line = badMode === 'csv' ? badLineCsv(b.reason, ctx) : badLineNdjson(b.reason, ctx);
        if (line !== null) yield line;
      }
    }
  }

  return { spec, header, truth, tickS, ticks, records };
}

function buildHeader(spec: TrialSpec, h: HeaderSpec): WireHeader {
  const musclesDecl: Record<string, { side: Side }> = {};
  const cal: Record<string, WireMuscleCalibration> = {};
  for (const m of spec.muscles) {
    musclesDecl[m.name] = { side: m.side };
    if (h.calibrate === 'all' || h.calibrate.includes(m.name)) {
      cal[m.name] = { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: m.sarcomeresInSeries };
    }
  }
  return {
    format: STREAM_FORMAT,
    version: STREAM_VERSION,
    ...(h.subject === undefined ? {} : { subject: h.subject }),
    ...(h.trial === undefined ? {} : { trial: h.trial }),
    rate_hz: spec.rateHz,
    muscles: musclesDecl,
    ...(Object.keys(cal).length === 0 ? {} : { calibration: { muscles: cal } }),
  };
}

/** A calibration file's content for the muscles of a spec (the true sarcomeres in series). */
export function calibrationJson(spec: TrialSpec): { muscles: Record<string, WireMuscleCalibration> } {
  const muscles: Record<string, WireMuscleCalibration> = {};
  for (const m of spec.muscles) {
    muscles[m.name] = { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: m.sarcomeresInSeries };
  }
  return { muscles };
}
