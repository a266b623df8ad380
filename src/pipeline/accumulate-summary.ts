import { StrideList } from '../trial/stride-list.ts';
import { Observable, type OperatorFunction } from 'rxjs';
import type { Batch, CalibrationApplied, Frame, GaitEvent, Sample, Side, StrideBoundary } from '../trial/records.ts';
import {
  CYCLE_POINTS,
  HISTOGRAM_BINS,
  emptyFrameCounts,
  spreadOf,
  type MuscleState,
  type Segmentation,
  type StrideSummary,
  type TrialState,
} from '../trial/state.ts';
import { REGION_KEYS, regionIndex, zeroRegionRecord, type RegionKey } from '../model/regions.ts';
import { DEFAULT_SPECIES, speciesCurve } from '../model/species.ts';
import { sarcomereCountSpread } from '../model/calibration.ts';
import { regionProbabilities } from '../model/region-probability.ts';
import { curveForCalibration } from '../model/calibration-curve.ts';
import { DEFAULT_GAP_S } from './mark-gaps.ts';
import { DEFAULT_SETTINGS, MAX_MARKERS_LISTED } from '../trial/settings.ts';
import { CycleBuffer, SegmentAccumulator, emptyCycleCurve, foldCycle, resampleCycle, type Held } from '../trial/stride-figures.ts';

export interface AccumulateSummaryOptions {
  /** Where the trial came from (file path or URL), for the summary. */
  readonly source: string;
  /** Intervals between two samples of a muscle longer than this count as gap time, not as held values. @default 0.25 */
  readonly gapS?: number;
  /**
   * A stride whose gap time exceeds this share of its duration is flagged and left out of the trial
   * figures and the cycle curve. @default 0.1
   */
  readonly maxGapFraction?: number;
  /** Sides given outside the stream (a mapping, --side): they win over the stream header's. */
  readonly sides?: Readonly<Record<string, Side>>;
}

/** Largest share of a stride that may be gap time before the stride is flagged. */
export const DEFAULT_MAX_GAP_FRACTION = DEFAULT_SETTINGS.stride_flag_gap_fraction;

const NO_PHASE = 0;
const STANCE = 1;
const SWING = 2;

interface MuscleAccumulator {
  readonly state: MuscleState;
  /** The same list as state.strides, writable here. */
  readonly strides: StrideList;
  /** Index of the stride in progress; -1 before the first boundary. */
  strideIndex: number;
  segmentation: Segmentation;
  readonly stride: SegmentAccumulator;
  readonly stance: SegmentAccumulator;
  readonly swing: SegmentAccumulator;
  /** NO_PHASE (no toe-off expected: estimated strides, or before the first boundary), STANCE or SWING. */
  phase: number;
  toeOffS: number;
  readonly cycle: CycleBuffer;
  /** The last sample with an estimate, held until the next one (NaN time: none held). */
  heldTS: number;
  readonly held: Held;
  /** Newest sample whose region probabilities are not yet in the state. */
  probabilityDue: boolean;
}

/**
 * Folds the enriched frames into the trial's running state: counts, each muscle's latest sample, and
 * per-stride and per-phase operating-range figures, the gait-cycle curve and the trial's histograms.
 * Emits the same TrialState object at once, after every batch (mutated in place), and once more, marked
 * ended, when the input completes. Memory is bounded per muscle: one stride's points at a time.
 */
export function accumulateSummary(options: AccumulateSummaryOptions): OperatorFunction<Batch, TrialState> {
  const gapS = options.gapS ?? DEFAULT_GAP_S;
  const maxGapFraction = options.maxGapFraction ?? DEFAULT_MAX_GAP_FRACTION;
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
        markers: [],
        lastTS: Number.NaN,
        firstTS: Number.NaN,
        ended: false,
      };
      const markers = state.markers as NonNullable<TrialState['markers']>;
      let markersSeen = 0;
      const listMarker = (tS: number, text: string): void => {
        markersSeen++;
        if (markersSeen <= MAX_MARKERS_LISTED) markers.push({ tS, text });
        else if (markersSeen === MAX_MARKERS_LISTED + 1) {
          state.warnings.push(`more than ${MAX_MARKERS_LISTED} markers: the summary lists the first ${MAX_MARKERS_LISTED} (frames.markers counts them all)`);
        }
      };
      const accumulators = new Map<string, MuscleAccumulator>();
      const probability = new Float64Array(REGION_KEYS.length);
      const resampled = new Float64Array(CYCLE_POINTS);

      const sides = options.sides ?? {};
      const fixedSide = (name: string): Side | null => (Object.hasOwn(sides, name) ? (sides[name] as Side) : null);

      const muscle = (name: string): MuscleAccumulator => {
        let acc = accumulators.get(name);
        if (acc === undefined) {
          const strides = new StrideList();
          acc = {
            strides,
            state: {
              name,
              side: fixedSide(name),
              sideSource: fixedSide(name) === null ? null : 'declared',
              species: DEFAULT_SPECIES,
              curve: speciesCurve(DEFAULT_SPECIES),
              sarcomeresInSeries: Number.NaN,
              calibrationSource: null,
              latest: null,
              current: null,
              strides,
              segmentation: null,
              relativeSd: 0,
              regionProbability: null,
              cycle: emptyCycleCurve(),
            },
            strideIndex: -1,
            segmentation: 'events',
            stride: new SegmentAccumulator(),
            stance: new SegmentAccumulator(),
            swing: new SegmentAccumulator(),
            phase: NO_PHASE,
            toeOffS: Number.NaN,
            cycle: new CycleBuffer(),
            heldTS: Number.NaN,
            held: { slUm: Number.NaN, force: Number.NaN, forceLv: Number.NaN, forceTendon: Number.NaN, region: -1 },
            probabilityDue: false,
          };
          accumulators.set(name, acc);
          state.muscles.set(name, acc.state);
        }
        return acc;
      };

      /** Credits the held sample's value from its time up to `untilS` to the stride (and phase) in progress. */
      const release = (acc: MuscleAccumulator, untilS: number): void => {
        const dtS = untilS - acc.heldTS;
        if (acc.strideIndex < 0 || !(dtS > 0) || dtS > gapS) return;
        acc.stride.credit(acc.held, dtS);
        if (acc.phase === STANCE) acc.stance.credit(acc.held, dtS);
        else if (acc.phase === SWING) acc.swing.credit(acc.held, dtS);
      };

      /** Credits the held value up to a time where something changes, and keeps holding it from there. */
      const releaseAt = (acc: MuscleAccumulator, tS: number): void => {
        if (Number.isNaN(acc.heldTS)) return;
        release(acc, tS);
        acc.heldTS = tS;
      };

      const onSample = (s: Sample): void => {
        const counts = state.frames;
        counts.accepted++;
        if (s.lowQuality) counts.lowQuality++;
        if (Number.isNaN(state.firstTS)) state.firstTS = s.tS;
        state.lastTS = s.tS;
        const acc = muscle(s.muscle);
        acc.state.latest = s;
        if (!Number.isNaN(s.activation)) acc.state.activationSamples = (acc.state.activationSamples ?? 0) + 1;
        acc.probabilityDue = true;
        if (!Number.isNaN(acc.heldTS)) release(acc, s.tS);
        if (Number.isNaN(s.sarcomereUm) || s.region === null) {
          acc.heldTS = Number.NaN;
          return;
        }
        acc.heldTS = s.tS;
        const held = acc.held;
        held.slUm = s.sarcomereUm;
        held.force = s.force;
        held.forceLv = s.forceLv;
        held.forceTendon = s.forceTendon;
        held.region = regionIndex(s.region);
        if (acc.strideIndex < 0 || s.strideIndex !== acc.strideIndex) return;
        acc.stride.count(s.sarcomereUm, s.velocityMmS);
        if (acc.phase === STANCE) acc.stance.count(s.sarcomereUm, s.velocityMmS);
        else if (acc.phase === SWING) acc.swing.count(s.sarcomereUm, s.velocityMmS);
        acc.cycle.push(s.tS, s.sarcomereUm);
        const current = acc.state.current;
        if (current !== null) {
          current.slMinUm = acc.stride.slMinUm;
          current.slMaxUm = acc.stride.slMaxUm;
        }
      };

      /** Closes the stride in progress at `endS`: its figures, its flag, its share of the trial's sums. */
      const closeStride = (acc: MuscleAccumulator, endS: number): void => {
        const m = acc.state;
        const spread = spreadOf(m);
        const figures = acc.stride.finish(endS, m.curve, spread);
        const durationS = endS - figures.startS;
        const flagged = !(figures.gapS <= maxGapFraction * durationS) || figures.sampleCount === 0;
        const phased = acc.phase === SWING;
        const summary: StrideSummary = {
          index: acc.strideIndex,
          ...figures,
          flagged,
          segmentation: acc.segmentation,
          stance: phased ? acc.stance.finish(acc.toeOffS, m.curve, spread) : null,
          swing: phased ? acc.swing.finish(endS, m.curve, spread) : null,
        };
        acc.strides.push(summary);
        if (flagged) return;
        const histograms = (m.trialHistograms ??= {
          stride: new Float64Array(HISTOGRAM_BINS),
          stance: new Float64Array(HISTOGRAM_BINS),
          swing: new Float64Array(HISTOGRAM_BINS),
        });
        acc.stride.histogram.mergeInto(histograms.stride);
        if (phased) {
          acc.stance.histogram.mergeInto(histograms.stance);
          acc.swing.histogram.mergeInto(histograms.swing);
        }
        const buffer = acc.cycle;
        if (!buffer.overflow && resampleCycle(buffer.tS, buffer.slUm, buffer.length, figures.startS, endS, resampled)) {
          foldCycle((m.cycle ??= emptyCycleCurve()), resampled);
        }
      };

      const onStride = (f: StrideBoundary): void => {
        const acc = muscle(f.muscle);
        const m = acc.state;
        if (m.side === null && f.segmentation !== 'estimated') {
          m.side = f.side;
          m.sideSource = 'assumed';
        }
        releaseAt(acc, f.tS);
        if (acc.strideIndex >= 0) closeStride(acc, f.tS);
        acc.strideIndex = f.index;
        acc.segmentation = f.segmentation ?? 'events';
        m.segmentation = acc.segmentation;
        acc.stride.reset(f.tS);
        acc.phase = acc.segmentation === 'events' ? STANCE : NO_PHASE;
        if (acc.phase === STANCE) acc.stance.reset(f.tS);
        acc.toeOffS = Number.NaN;
        acc.cycle.clear();
        // The held value carries on into the new stride: it is the curve's value at 0%.
        if (!Number.isNaN(acc.heldTS)) acc.cycle.push(f.tS, acc.held.slUm);
        m.current = { index: f.index, startS: f.tS, slMinUm: Number.NaN, slMaxUm: Number.NaN };
      };

      /** A toe-off of a muscle's side ends the stance of its stride in progress (the first toe-off only). */
      const onToeOff = (e: GaitEvent): void => {
        for (const acc of accumulators.values()) {
          if (acc.state.side !== e.side || acc.phase !== STANCE || acc.strideIndex < 0) continue;
          releaseAt(acc, e.tS);
          acc.phase = SWING;
          acc.toeOffS = e.tS;
          acc.swing.reset(e.tS);
        }
      };

      /** The newest sample's region probabilities, once per batch (the dashboard reads them). */
      const updateProbabilities = (): void => {
        for (const acc of accumulators.values()) {
          if (!acc.probabilityDue) continue;
          acc.probabilityDue = false;
          const m = acc.state;
          const latest = m.latest;
          const spread = spreadOf(m);
          if (latest === null || !(spread.relativeSd > 0) || !Number.isFinite(latest.sarcomereUm)) {
            m.regionProbability = null;
            continue;
          }
          regionProbabilities(m.curve, latest.sarcomereUm, spread, probability);
          const record: Record<RegionKey, number> = (m.regionProbability ??= zeroRegionRecord());
          for (let r = 0; r < REGION_KEYS.length; r++) record[REGION_KEYS[r] as RegionKey] = probability[r] as number;
        }
      };

      const onCalibration = (f: CalibrationApplied): void => {
        const m = muscle(f.muscle).state;
        m.species = f.calibration.species;
        m.curve = curveForCalibration(f.calibration);
        const spread = sarcomereCountSpread(f.calibration, m.curve);
        m.relativeSd = spread.relativeSd;
        m.spreadShape = spread.shape;
        m.sarcomeresInSeries = f.sarcomeresInSeries;
        m.calibrationSource = f.source;
        m.calibrationMethod = f.calibration.method;
        m.shape = f.calibration.shape ?? 'geometric';
        m.provenance = f.calibration.provenance ?? null;
        m.activationShift = f.calibration.activationShift ?? 0;
        m.activation = f.calibration.activation ?? Number.NaN;
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
            const n = f.count ?? 1;
            counts.received += n;
            counts.rejected += n;
            counts.rejectedByReason[f.reason] = (counts.rejectedByReason[f.reason] ?? 0) + n;
            return;
          }
          case 'event':
            state.frames.received++;
            state.frames.gaitEvents++;
            if (Number.isNaN(state.firstTS)) state.firstTS = f.tS;
            if (!(f.tS < state.lastTS)) state.lastTS = f.tS;
            if (f.event === 'toe_off') onToeOff(f);
            return;
          case 'marker':
            state.frames.received++;
            state.frames.markers++;
            listMarker(f.tS, f.marker);
            return;
          case 'disconnection':
          case 'clock_reset':
            // A lost connection counts among the markers, as it did when it was one; a device's clock restart too.
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
              if (decl.side !== undefined && fixedSide(name) === null) {
                m.side = decl.side;
                m.sideSource = 'declared';
              }
            }
            return;
          case 'calibration':
            onCalibration(f);
            return;
          case 'stride':
            onStride(f);
            return;
          case 'gap':
            if (f.muscle === null) for (const acc of accumulators.values()) acc.heldTS = Number.NaN;
            else {
              // A gap of a muscle never seen (a lost connection names what it carried) starts nothing.
              const acc = accumulators.get(f.muscle);
              if (acc !== undefined) acc.heldTS = Number.NaN;
            }
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
          updateProbabilities();
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
