import type { OperatorFunction } from 'rxjs';
import { holdingStage } from './holding-stage.ts';
import type { Batch, CalibrationApplied, Frame, Sample } from '../trial/records.ts';
import {
  ARCHITECTURE_PRIOR_CAUTION,
  METHOD_LABEL,
  fascicleOffsetMm,
  sarcomereUmFromFascicle,
  sarcomeresInSeries,
  type CalibrationSpec,
  type MuscleCalibration,
} from '../model/calibration.ts';
import { DEFAULT_SPECIES } from '../model/species.ts';
import { plateauMiddleUm } from '../model/geometry.ts';
import { median } from '../model/stats.ts';
import { curveForCalibration } from '../model/calibration-curve.ts';
import { DEFAULT_SKIP_BELOW } from './gate-quality.ts';
import { DEFAULT_SETTINGS, MAX_HELD_FRAMES } from '../trial/settings.ts';

export interface ConvertSarcomereOptions {
  /** A calibration given by the user (a file); it wins over the stream header's. */
  readonly calibration?: CalibrationSpec;
  /**
   * For a muscle with no calibration: seconds of its first samples whose median fascicle length is
   * assumed to sit at the plateau middle. Frames are held (not dropped) while the window fills. @default 3
   */
  readonly baselineS?: number;
  /** Quality below which a sample does not count towards the baseline median. @default 0.2 */
  readonly skipBelow?: number;
  /** Most frames held at once; when more wait, every baseline window closes on what it holds. @default MAX_HELD_FRAMES */
  readonly maxHeldFrames?: number;
}

export const DEFAULT_BASELINE_S = DEFAULT_SETTINGS.baseline_s;

/** A muscle's own entry of a calibration (never a property every object has, such as "constructor"). */
function ownCalibration(spec: CalibrationSpec | undefined, muscle: string): MuscleCalibration | undefined {
  return spec !== undefined && Object.hasOwn(spec.muscles, muscle) ? spec.muscles[muscle] : undefined;
}

interface Collecting {
  readonly startS: number;
  readonly fascicleMm: number[];
}

/**
 * Fascicle length → estimated sarcomere length through each muscle's sarcomeres in series. Says each
 * muscle's calibration once, as a CalibrationApplied frame ahead of its first converted sample. A muscle
 * with no calibration gets one from its baseline window, loudly (a Notice says so); while a window fills,
 * every frame is held back in order, never dropped. A window closes by the stream's time, or once
 * maxHeldFrames frames wait; rejections are never held (they only need counting).
 */
export function convertSarcomere(options: ConvertSarcomereOptions = {}): OperatorFunction<Batch, Batch> {
  const baselineS = options.baselineS ?? DEFAULT_BASELINE_S;
  const skipBelow = options.skipBelow ?? DEFAULT_SKIP_BELOW;
  const fileSpec = options.calibration;
  const maxHeldFrames = options.maxHeldFrames ?? MAX_HELD_FRAMES;

  return holdingStage(() => {
    /** Sarcomeres in series (and the constant part of the tracked length, mm) of each muscle whose calibration is known. */
    const ready = new Map<string, { readonly n: number; readonly offsetMm: number }>();
    const collecting = new Map<string, Collecting>();
    let headerSpec: CalibrationSpec | undefined;
    let held: Frame[] = [];
    /** Calibrations decided from a baseline; they go out ahead of the held frames. */
    let decided: Frame[] = [];

    const convert = (s: Sample): void => {
      const c = ready.get(s.muscle);
      if (c !== undefined) s.sarcomereUm = sarcomereUmFromFascicle(s.smoothMm, c.n, c.offsetMm);
    };

    const finishBaseline = (muscle: string, state: Collecting): void => {
      const fascicleMm = median(state.fascicleMm);
      const calibration: MuscleCalibration = { species: DEFAULT_SPECIES, method: 'optimal_length', optimalFascicleMm: fascicleMm };
      const n = (fascicleMm * 1000) / plateauMiddleUm(curveForCalibration(calibration));
      collecting.delete(muscle);
      ready.set(muscle, { n, offsetMm: 0 });
      decided.push(
        { kind: 'calibration', muscle, calibration, sarcomeresInSeries: n, source: 'baseline' },
        {
          kind: 'notice',
          muscle,
          text: Number.isFinite(n)
            ? `${muscle}: UNCALIBRATED — its median fascicle length over the first ${baselineS} s (${fascicleMm.toFixed(1)} mm) is assumed to sit at the plateau middle; give a calibration for real estimates`
            : `${muscle}: UNCALIBRATED, and its first ${baselineS} s hold no usable sample to assume a baseline from; no sarcomere lengths are estimated for it`,
        },
      );
    };

    const flushInto = (out: Frame[]): void => {
      for (const f of held) if (f.kind === 'sample') convert(f);
      for (const f of decided) out.push(f);
      for (const f of held) out.push(f);
      held = [];
      decided = [];
    };

    /** First sample of a muscle: take its calibration (file, then header) or start its baseline window. */
    const start = (s: Sample, out: Frame[]): void => {
      const fromFile = ownCalibration(fileSpec, s.muscle);
      const calibration = fromFile ?? ownCalibration(headerSpec, s.muscle);
      if (calibration === undefined) {
        collecting.set(s.muscle, { startS: s.tS, fascicleMm: [] });
        return;
      }
      const n = sarcomeresInSeries(calibration, curveForCalibration(calibration));
      ready.set(s.muscle, { n, offsetMm: fascicleOffsetMm(calibration) });
      const frame: CalibrationApplied = {
        kind: 'calibration',
        muscle: s.muscle,
        calibration,
        sarcomeresInSeries: n,
        source: fromFile !== undefined ? 'file' : 'header',
      };
      const to = collecting.size > 0 ? held : out;
      to.push(frame);
      if (calibration.method === 'architecture_prior') {
        to.push({
          kind: 'notice',
          muscle: s.muscle,
          text: `${s.muscle}: calibrated by a ${METHOD_LABEL.architecture_prior} (${calibration.priorSource}): ${ARCHITECTURE_PRIOR_CAUTION}`,
        });
      }
    };

    /** The general path for one frame; `out` receives what can go now. */
    const step = (f: Frame, out: Frame[]): void => {
      if (f.kind === 'rejection') {
        out.push(f);
        return;
      }
      if (f.kind === 'header' && f.calibration !== undefined) headerSpec = f.calibration;
      if (f.kind === 'calibration' && f.source === 'runtime') {
        // Captured while running (e.g. from the dashboard): replaces the muscle's calibration from here on.
        collecting.delete(f.muscle);
        ready.set(f.muscle, { n: f.sarcomeresInSeries, offsetMm: fascicleOffsetMm(f.calibration) });
      }
      if (f.kind === 'sample') {
        if (!ready.has(f.muscle) && !collecting.has(f.muscle)) start(f, out);
        const window = collecting.get(f.muscle);
        if (window !== undefined && f.quality >= skipBelow && Number.isFinite(f.fascicleMm)) window.fascicleMm.push(f.fascicleMm);
        // A window closes by the stream's time, not only its own muscle's: a muscle that falls silent
        // inside its window must not hold every other muscle back.
        for (const [muscle, w] of collecting) if (f.tS - w.startS >= baselineS) finishBaseline(muscle, w);
        if (window !== undefined || collecting.size > 0 || decided.length > 0) {
          held.push(f);
          if (collecting.size > 0 && held.length >= maxHeldFrames) for (const [muscle, w] of [...collecting]) finishBaseline(muscle, w);
          if (collecting.size === 0) flushInto(out);
          return;
        }
      }
      if (collecting.size > 0) {
        held.push(f);
        if (held.length >= maxHeldFrames) {
          // Too much waits: every window closes on what it holds.
          for (const [muscle, w] of [...collecting]) finishBaseline(muscle, w);
          flushInto(out);
        }
      } else {
        if (f.kind === 'sample') convert(f);
        out.push(f);
      }
    };

    const process = (batch: Batch): Batch => {
      // Fast path: convert in place while nothing is held and nothing new is decided.
      if (collecting.size === 0) {
        let i = 0;
        for (; i < batch.length; i++) {
          const f = batch[i] as Frame;
          if (f.kind === 'sample') {
            const c = ready.get(f.muscle);
            if (c === undefined) break;
            f.sarcomereUm = sarcomereUmFromFascicle(f.smoothMm, c.n, c.offsetMm);
          } else if (f.kind === 'header' || f.kind === 'calibration') {
            step(f, []);
          }
        }
        if (i === batch.length) return batch;
        const out = batch.slice(0, i);
        for (; i < batch.length; i++) step(batch[i] as Frame, out);
        return out;
      }
      const out: Frame[] = [];
      for (const f of batch) step(f, out);
      return out;
    };

    return {
      process,
      finish: () => {
        // The input ended inside a baseline window: decide from what the window holds.
        for (const [muscle, window] of [...collecting]) finishBaseline(muscle, window);
        const out: Frame[] = [];
        flushInto(out);
        return out;
      },
    };
  });
}
