import type { OperatorFunction } from 'rxjs';
import { holdingStage } from './holding-stage.ts';
import type { Batch, Frame, Sample, Side, StrideBoundary } from '../trial/records.ts';
import { DEFAULT_MAX_PERIOD_S, DEFAULT_MIN_PERIOD_S, dominantPeriod } from '../model/stride-period.ts';
import { DEFAULT_SETTINGS, MAX_HELD_FRAMES } from '../trial/settings.ts';

export interface EstimateStridesOptions {
  /**
   * Seconds of a muscle's samples with no stride boundary (no foot strike of its side) after which its
   * strides are estimated from its own fascicle-length signal. Every frame is held (never dropped) while
   * a muscle's window fills. @default 10
   */
  readonly windowS?: number;
  /** Shortest stride period looked for (s). @default 0.4 */
  readonly minPeriodS?: number;
  /** Longest stride period looked for (s). @default 3 */
  readonly maxPeriodS?: number;
  /** Most frames held at once; when more wait, every pending decision is taken from what is held. @default MAX_HELD_FRAMES */
  readonly maxHeldFrames?: number;
}

export const DEFAULT_ESTIMATE_WINDOW_S = DEFAULT_SETTINGS.stride_estimate_window_s;

/**
 * A cycle's shortest length counts as its boundary only when the signal came down to it from at least
 * this share of the window's spread (5th to 95th percentile); a lower value at the start of a rising
 * stretch is not a cycle's minimum.
 */
const MIN_DEPTH_SHARE = 0.3;
/** How long past its due time a silent muscle's pending boundary waits for the muscle's own samples (s). */
const SILENCE_S = 0.25;
/** How much of each new stride's duration the running period takes in (an exponential mean). */
const PERIOD_ADAPT = 0.2;

type Mode = 'undecided' | 'events' | 'estimated' | 'none';

interface Detector {
  periodS: number;
  readonly depthMm: number;
  /** Cycle minima are looked for from here on (half a period after the last boundary). */
  searchFromS: number;
  lastBoundaryS: number;
  candidate: Sample | null;
  /** Highest length since the search started, before the candidate. */
  peakBeforeMm: number;
  /** Highest length after the candidate. */
  peakAfterMm: number;
  runningMaxMm: number;
}

interface MuscleStrides {
  mode: Mode;
  /** Start of the window: the muscle's first sample, or its first after a hole longer than the longest period. */
  firstS: number;
  /** Its latest sample's time while undecided. */
  lastS: number;
  /** The window's smoothed lengths while undecided (bounded by the window). */
  windowTS: number[];
  windowMm: number[];
  detector: Detector | null;
  /** Index of the last boundary said (estimated mode). */
  index: number;
  /** Index of the last boundary released downstream: the stride of the samples released after it. */
  releasedIndex: number;
  toldLateEvents: boolean;
}

/**
 * For a muscle whose side brings no foot strikes, estimates strides from its smoothed fascicle length and
 * says them as the same StrideBoundary frames segmentStrides says for foot strikes (marked
 * `segmentation: 'estimated'`), so every later stage works unchanged. The stride period is the dominant
 * period of the autocorrelation over the muscle's first window; one boundary per cycle at the cycle's
 * shortest length, decided once the signal has stayed above it for half a period. So frames are held:
 * all of them while a muscle's window fills, then from the oldest undecided sample of an estimated muscle
 * — about half a stride. A Notice says what was done. Order is kept and nothing is dropped, except foot
 * strike boundaries for a muscle whose strides are already estimated (a Notice says so).
 *
 * What is held is bounded by time and by count, never by the span a sample's time claims: a hole in a
 * muscle's samples longer than the longest period looked for starts its window again after the hole
 * (the stretch before it is not part of the same steady walk), and once maxHeldFrames frames wait, every
 * pending decision is taken from what is held. Rejections are never held: they only need counting.
 */
export function estimateStrides(options: EstimateStridesOptions = {}): OperatorFunction<Batch, Batch> {
  const windowS = options.windowS ?? DEFAULT_ESTIMATE_WINDOW_S;
  const minPeriodS = options.minPeriodS ?? DEFAULT_MIN_PERIOD_S;
  const maxPeriodS = options.maxPeriodS ?? DEFAULT_MAX_PERIOD_S;
  const maxHeldFrames = options.maxHeldFrames ?? MAX_HELD_FRAMES;

  return holdingStage(() => {
    const muscles = new Map<string, MuscleStrides>();
    const declared = new Map<string, Side>();
    let undecided = 0;
    let estimated = 0;
    /** Frames not yet released, in order, from `head`. */
    let held: Frame[] = [];
    let head = 0;
    /** The newest sample time seen, any muscle. */
    let latestS = Number.NEGATIVE_INFINITY;

    const notice = (muscle: string, text: string): void => {
      held.push({ kind: 'notice', muscle, text });
    };

    /** The time before which an estimated muscle's samples know their stride. */
    const horizon = (m: MuscleStrides): number => {
      const d = m.detector;
      if (d === null) return Number.POSITIVE_INFINITY;
      return d.candidate !== null ? d.candidate.tS : d.searchFromS;
    };

    const commit = (name: string, m: MuscleStrides, d: Detector): void => {
      const at = d.candidate as Sample;
      if (Number.isFinite(d.lastBoundaryS)) {
        const durationS = at.tS - d.lastBoundaryS;
        if (durationS > 0.6 * d.periodS && durationS < 1.6 * d.periodS) d.periodS += PERIOD_ADAPT * (durationS - d.periodS);
      }
      m.index++;
      const boundary: StrideBoundary = {
        kind: 'stride',
        muscle: name,
        side: declared.get(name) ?? 'left',
        index: m.index,
        tS: at.tS,
        segmentation: 'estimated',
      };
      const position = held.lastIndexOf(at);
      held.splice(position < head ? held.length : position, 0, boundary);
      d.lastBoundaryS = at.tS;
      d.searchFromS = at.tS + 0.5 * d.periodS;
      d.candidate = null;
      d.runningMaxMm = Number.NEGATIVE_INFINITY;
      d.peakBeforeMm = Number.NEGATIVE_INFINITY;
    };

    const feed = (name: string, m: MuscleStrides, s: Sample): void => {
      const d = m.detector;
      if (d === null || !Number.isFinite(s.smoothMm) || s.tS < d.searchFromS) return;
      const mm = s.smoothMm;
      if (d.candidate === null) {
        d.candidate = s;
        d.peakBeforeMm = mm;
        d.peakAfterMm = Number.NEGATIVE_INFINITY;
      } else if (mm < d.candidate.smoothMm) {
        d.candidate = s;
        d.peakBeforeMm = d.runningMaxMm;
        d.peakAfterMm = Number.NEGATIVE_INFINITY;
      } else if (mm > d.peakAfterMm) {
        d.peakAfterMm = mm;
      }
      if (mm > d.runningMaxMm) d.runningMaxMm = mm;
      const c = d.candidate;
      if (s.tS - c.tS < 0.5 * d.periodS) return;
      if (d.peakBeforeMm - c.smoothMm >= d.depthMm) {
        commit(name, m, d);
        feed(name, m, s);
      } else {
        // The candidate sat at the start of a rise, not at a cycle's minimum: look again from here.
        d.candidate = s;
        d.peakBeforeMm = mm;
        d.peakAfterMm = Number.NEGATIVE_INFINITY;
        d.runningMaxMm = mm;
      }
    };

    const decide = (name: string, m: MuscleStrides): void => {
      undecided--;
      const n = m.windowTS.length;
      const period = dominantPeriod(m.windowTS, m.windowMm, n, { minPeriodS, maxPeriodS });
      m.windowTS = [];
      m.windowMm = [];
      if (period === null) {
        m.mode = 'none';
        notice(
          name,
          `${name}: no foot strikes of its side, and its fascicle length shows no steady stride period of ${minPeriodS}–${maxPeriodS} s in its first ${windowS} s; no strides are counted for it. Give gait events (foot_strike, toe_off) for strides`,
        );
        return;
      }
      m.mode = 'estimated';
      estimated++;
      m.detector = {
        periodS: period.periodS,
        depthMm: MIN_DEPTH_SHARE * period.rangeP5P95,
        searchFromS: m.firstS,
        lastBoundaryS: Number.NaN,
        candidate: null,
        peakBeforeMm: Number.NEGATIVE_INFINITY,
        peakAfterMm: Number.NEGATIVE_INFINITY,
        runningMaxMm: Number.NEGATIVE_INFINITY,
      };
      notice(
        name,
        `${name}: no foot strikes of its side in its first ${windowS} s, so its strides are ESTIMATED from its fascicle length (period ${period.periodS.toFixed(2)} s, one stride per cycle; each starts at the fascicle-length minimum, not at a foot strike; no stance/swing phases). Give gait events (foot_strike, toe_off) for strides from foot strike to foot strike`,
      );
      // The window's samples, held in order, go through the detector now.
      const mine: Sample[] = [];
      for (let i = head; i < held.length; i++) {
        const f = held[i] as Frame;
        if (f.kind === 'sample' && f.muscle === name) mine.push(f);
      }
      for (const s of mine) feed(name, m, s);
    };

    /**
     * A muscle that falls silent must not hold the others back: once the stream's time (any muscle's
     * sample) is a window past its first sample, it is decided; once it is half a period and a gap past
     * a pending candidate, the candidate is settled as if a sample had come.
     */
    const settleOthers = (own: MuscleStrides, tS: number): void => {
      for (const [name, m] of muscles) {
        if (m === own) continue;
        if (m.mode === 'undecided' && tS - m.firstS >= windowS) decide(name, m);
        else if (m.mode === 'estimated') {
          const c = m.detector?.candidate ?? null;
          if (c !== null && tS - c.tS >= 0.5 * (m.detector as Detector).periodS + SILENCE_S) settle(name, m, tS);
        }
      }
    };

    /** A pending candidate is taken as a boundary now if the signal came down to it deep enough, else dropped, searching again from tS. */
    const settle = (name: string, m: MuscleStrides, tS: number): void => {
      const d = m.detector;
      const c = d?.candidate ?? null;
      if (d === null || c === null) return;
      if (d.peakBeforeMm - c.smoothMm >= d.depthMm) commit(name, m, d);
      else {
        d.candidate = null;
        d.searchFromS = tS;
        d.runningMaxMm = Number.NEGATIVE_INFINITY;
      }
    };

    /** Too many frames wait: every muscle still filling its window is decided from it, every pending candidate settled. */
    const decideNow = (): void => {
      for (const [name, m] of muscles) {
        if (m.mode === 'undecided') decide(name, m);
        else if (m.mode === 'estimated') settle(name, m, latestS);
      }
    };

    const muscleOf = (name: string, tS: number): MuscleStrides => {
      let m = muscles.get(name);
      if (m === undefined) {
        m = { mode: 'undecided', firstS: tS, lastS: tS, windowTS: [], windowMm: [], detector: null, index: -1, releasedIndex: -1, toldLateEvents: false };
        muscles.set(name, m);
        undecided++;
      }
      return m;
    };

    /** Takes one frame in; it waits in `held` until release, or goes into `out` at once (a rejection). */
    const step = (f: Frame, out: Frame[]): void => {
      if (f.kind === 'rejection') {
        out.push(f);
        return;
      }
      if (f.kind === 'header') {
        for (const [name, decl] of Object.entries(f.muscles)) if (decl.side !== undefined) declared.set(name, decl.side);
      } else if (f.kind === 'stride' && f.segmentation !== 'estimated') {
        const m = muscles.get(f.muscle);
        if (m !== undefined && m.mode === 'estimated') {
          if (!m.toldLateEvents) {
            m.toldLateEvents = true;
            notice(f.muscle, `${f.muscle}: foot strikes of its side arrived after its strides were estimated from its fascicle length; they are not used for ${f.muscle}`);
          }
          return;
        }
        if (m === undefined) muscles.set(f.muscle, { mode: 'events', firstS: f.tS, lastS: f.tS, windowTS: [], windowMm: [], detector: null, index: -1, releasedIndex: -1, toldLateEvents: false });
        else if (m.mode === 'undecided' || m.mode === 'none') {
          if (m.mode === 'undecided') undecided--;
          m.mode = 'events';
          m.windowTS = [];
          m.windowMm = [];
        }
      } else if (f.kind === 'sample') {
        const m = muscleOf(f.muscle, f.tS);
        if (f.tS > latestS) latestS = f.tS;
        if (undecided > 0 || estimated > 0) settleOthers(m, f.tS);
        held.push(f);
        if (m.mode === 'undecided') {
          if (f.tS - m.lastS > maxPeriodS) {
            // A hole longer than any period: the window starts again after it.
            m.firstS = f.tS;
            m.windowTS = [];
            m.windowMm = [];
          }
          m.lastS = f.tS;
          if (Number.isFinite(f.smoothMm)) {
            m.windowTS.push(f.tS);
            m.windowMm.push(f.smoothMm);
          }
          if (f.tS - m.firstS >= windowS) decide(f.muscle, m);
        } else if (m.mode === 'estimated') {
          feed(f.muscle, m, f);
        }
        return;
      }
      held.push(f);
    };

    /** Releases the frames whose stride is known, in order, into `out`. */
    const release = (out: Frame[]): void => {
      if (undecided > 0) return;
      for (; head < held.length; head++) {
        const f = held[head] as Frame;
        if (f.kind === 'sample') {
          const m = muscles.get(f.muscle);
          if (m !== undefined && m.mode === 'estimated') {
            if (!(f.tS < horizon(m))) break;
            f.strideIndex = m.releasedIndex;
          }
        } else if (f.kind === 'stride' && f.segmentation === 'estimated') {
          const m = muscles.get(f.muscle);
          if (m !== undefined) m.releasedIndex = f.index;
        }
        out.push(f);
      }
      if (head === held.length) {
        held = [];
        head = 0;
      } else if (head > 4096 && head > held.length / 2) {
        held = held.slice(head);
        head = 0;
      }
    };

    /** Past maxHeldFrames waiting frames, what is pending is decided now. */
    const bound = (): void => {
      if (held.length - head > maxHeldFrames) decideNow();
    };

    const process = (batch: Batch): Batch => {
      // Fast path: nothing held, nothing estimated, every muscle decided.
      if (held.length === 0 && estimated === 0 && undecided === 0) {
        let i = 0;
        for (; i < batch.length; i++) {
          const f = batch[i] as Frame;
          if (f.kind === 'sample' || f.kind === 'stride') {
            if (!muscles.has(f.muscle)) break;
          } else if (f.kind === 'header') break;
        }
        if (i === batch.length) return batch;
        const out = batch.slice(0, i);
        for (; i < batch.length; i++) step(batch[i] as Frame, out);
        bound();
        release(out);
        return out;
      }
      const out: Frame[] = [];
      for (const f of batch) step(f, out);
      bound();
      release(out);
      return out;
    };


    return {
      process,
      finish: () => {
        // The input ended inside a window: decide from what it holds; then everything still held goes,
        // the samples after the last boundary staying in the unfinished stride.
        for (const [name, m] of muscles) if (m.mode === 'undecided') decide(name, m);
        // A minimum the input ended less than half a period after still closes the last full cycle, when the
        // signal came down to it and back up by the cycle's depth.
        for (const [name, m] of muscles) {
          const d = m.detector;
          const c = d?.candidate ?? null;
          if (d !== null && c !== null && d.peakBeforeMm - c.smoothMm >= d.depthMm && d.peakAfterMm - c.smoothMm >= d.depthMm) commit(name, m, d);
        }
        for (const m of muscles.values()) if (m.detector !== null) m.detector = null;
        const out: Frame[] = [];
        release(out);
        return out;
      },
    };
  });
}
