import { Observable, type OperatorFunction } from 'rxjs';
import type { Batch, CalibrationApplied, Frame, Sample } from '../records.ts';
import { emptyFrameCounts, type MuscleState, type StrideSummary, type TrialState } from '../state.ts';
import { REGION_KEYS, regionIndex, type RegionKey } from '../model/regions.ts';
import { DEFAULT_SPECIES, speciesCurve } from '../model/species.ts';
import { curveForCalibration } from './muscle-model.ts';
import { DEFAULT_GAP_S } from './mark-gaps.ts';

export interface AccumulateSummaryOptions {
  /** Where the trial came from (file path or URL), for the summary. */
  readonly source: string;
  /** Intervals between two samples of a muscle longer than this count as gap time, not as held values. @default 0.25 */
  readonly gapS?: number;
}

/** Running figures of the stride in progress; time-weighted by holding each sample until the next. */
class StrideAccumulator {
  slMinUm = Number.POSITIVE_INFINITY;
  slMaxUm = Number.NEGATIVE_INFINITY;
  slSecondsUm = 0;
  forceSeconds = 0;
  coveredS = 0;
  sampleCount = 0;
  readonly regionS = new Float64Array(REGION_KEYS.length);
  constructor(
    readonly index: number,
    readonly startS: number,
  ) {}

  finish(endS: number): StrideSummary {
    const covered = this.coveredS;
    const regionFraction = {} as Record<RegionKey, number>;
    for (let r = 0; r < REGION_KEYS.length; r++) {
      regionFraction[REGION_KEYS[r] as RegionKey] = covered > 0 ? (this.regionS[r] as number) / covered : 0;
    }
    const any = this.sampleCount > 0;
    return {
      index: this.index,
      startS: this.startS,
      endS,
      slMinUm: any ? this.slMinUm : Number.NaN,
      slMaxUm: any ? this.slMaxUm : Number.NaN,
      slMeanUm: covered > 0 ? this.slSecondsUm / covered : Number.NaN,
      regionFraction,
      forceMean: covered > 0 ? this.forceSeconds / covered : Number.NaN,
      gapS: Math.max(0, endS - this.startS - covered),
      sampleCount: this.sampleCount,
    };
  }
}

interface MuscleAccumulator {
  readonly state: MuscleState;
  stride: StrideAccumulator | null;
  /** The last sample with an estimate, held until the next one (NaN time: none held). */
  heldTS: number;
  heldSlUm: number;
  heldForce: number;
  heldRegion: number;
}

/**
 * Folds the enriched frames into the trial's running state: counts, each muscle's latest sample, and
 * per-stride operating-range figures. Emits the same TrialState object at once, after every batch (mutated
 * in place), and once more, marked ended, when the input completes.
 */
export function accumulateSummary(options: AccumulateSummaryOptions): OperatorFunction<Batch, TrialState> {
  const gapS = options.gapS ?? DEFAULT_GAP_S;
  return (source) =>
    new Observable<TrialState>((subscriber) => {
      const state: TrialState = {
        source: options.source,
        subject: null,
        trial: null,
        calibrated: true,
        frames: emptyFrameCounts(),
        muscles: new Map(),
        warnings: [],
        lastTS: Number.NaN,
        firstTS: Number.NaN,
        ended: false,
      };
      const accumulators = new Map<string, MuscleAccumulator>();

      const muscle = (name: string): MuscleAccumulator => {
        let acc = accumulators.get(name);
        if (acc === undefined) {
          acc = {
            state: {
              name,
              side: null,
              sideSource: null,
              species: DEFAULT_SPECIES,
              curve: speciesCurve(DEFAULT_SPECIES),
              sarcomeresInSeries: Number.NaN,
              calibrationSource: null,
              latest: null,
              current: null,
              strides: [],
            },
            stride: null,
            heldTS: Number.NaN,
            heldSlUm: Number.NaN,
            heldForce: Number.NaN,
            heldRegion: -1,
          };
          accumulators.set(name, acc);
          state.muscles.set(name, acc.state);
        }
        return acc;
      };

      /** Credits the held sample's value from its time up to `untilS` to the stride in progress. */
      const release = (acc: MuscleAccumulator, untilS: number): void => {
        const dtS = untilS - acc.heldTS;
        const stride = acc.stride;
        if (stride === null || !(dtS > 0) || dtS > gapS) return;
        stride.coveredS += dtS;
        stride.slSecondsUm += acc.heldSlUm * dtS;
        stride.forceSeconds += acc.heldForce * dtS;
        if (acc.heldRegion >= 0) stride.regionS[acc.heldRegion] = (stride.regionS[acc.heldRegion] ?? 0) + dtS;
      };

      const onSample = (s: Sample): void => {
        const counts = state.frames;
        counts.accepted++;
        if (s.lowQuality) counts.lowQuality++;
        if (Number.isNaN(state.firstTS)) state.firstTS = s.tS;
        state.lastTS = s.tS;
        const acc = muscle(s.muscle);
        acc.state.latest = s;
        if (!Number.isNaN(acc.heldTS)) release(acc, s.tS);
        if (Number.isNaN(s.sarcomereUm) || s.region === null) {
          acc.heldTS = Number.NaN;
          return;
        }
        acc.heldTS = s.tS;
        acc.heldSlUm = s.sarcomereUm;
        acc.heldForce = s.force;
        acc.heldRegion = regionIndex(s.region);
        const stride = acc.stride;
        if (stride === null || s.strideIndex !== stride.index) return;
        stride.sampleCount++;
        if (s.sarcomereUm < stride.slMinUm) stride.slMinUm = s.sarcomereUm;
        if (s.sarcomereUm > stride.slMaxUm) stride.slMaxUm = s.sarcomereUm;
        const current = acc.state.current;
        if (current !== null) {
          current.slMinUm = stride.slMinUm;
          current.slMaxUm = stride.slMaxUm;
        }
      };

      const onCalibration = (f: CalibrationApplied): void => {
        const m = muscle(f.muscle).state;
        m.species = f.calibration.species;
        m.curve = curveForCalibration(f.calibration);
        m.sarcomeresInSeries = f.sarcomeresInSeries;
        m.calibrationSource = f.source;
        let calibrated = true;
        for (const other of state.muscles.values()) if (other.calibrationSource === 'baseline') calibrated = false;
        state.calibrated = calibrated;
      };

      const onFrame = (f: Frame): void => {
        switch (f.kind) {
          case 'sample':
            state.frames.received++;
            onSample(f);
            return;
          case 'rejection': {
            const counts = state.frames;
            counts.received++;
            counts.rejected++;
            counts.rejectedByReason[f.reason] = (counts.rejectedByReason[f.reason] ?? 0) + 1;
            return;
          }
          case 'event':
            state.frames.received++;
            state.frames.gaitEvents++;
            if (Number.isNaN(state.firstTS)) state.firstTS = f.tS;
            if (!(f.tS < state.lastTS)) state.lastTS = f.tS;
            return;
          case 'marker':
            state.frames.received++;
            state.frames.markers++;
            return;
          case 'header':
            state.frames.received++;
            state.frames.headers++;
            if (f.subject !== undefined) state.subject = f.subject;
            if (f.trial !== undefined) state.trial = f.trial;
            for (const [name, decl] of Object.entries(f.muscles)) {
              const m = muscle(name).state;
              if (decl.side !== undefined) {
                m.side = decl.side;
                m.sideSource = 'declared';
              }
            }
            return;
          case 'calibration':
            onCalibration(f);
            return;
          case 'stride': {
            const acc = muscle(f.muscle);
            if (acc.state.side === null) {
              acc.state.side = f.side;
              acc.state.sideSource = 'assumed';
            }
            if (!Number.isNaN(acc.heldTS)) {
              release(acc, f.tS);
              acc.heldTS = f.tS;
            }
            if (acc.stride !== null) acc.state.strides.push(acc.stride.finish(f.tS));
            acc.stride = new StrideAccumulator(f.index, f.tS);
            acc.state.current = { index: f.index, startS: f.tS, slMinUm: Number.NaN, slMaxUm: Number.NaN };
            return;
          }
          case 'gap':
            if (f.muscle === null) for (const acc of accumulators.values()) acc.heldTS = Number.NaN;
            else muscle(f.muscle).heldTS = Number.NaN;
            return;
          case 'notice':
            if (!state.warnings.includes(f.text)) state.warnings.push(f.text);
            return;
        }
      };

      // Readers get a state at once, before any input: the dashboard can say it is waiting.
      subscriber.next(state);
      return source.subscribe({
        next: (batch) => {
          for (const f of batch) onFrame(f);
          subscriber.next(state);
        },
        error: (error: unknown) => subscriber.error(error),
        complete: () => {
          state.ended = true;
          subscriber.next(state);
          subscriber.complete();
        },
      });
    });
}
