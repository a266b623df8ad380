/**
 * The typed records that travel through the pipeline. Adapters turn raw lines and messages into these
 * (validating with zod at that edge only); every stage after that trusts them.
 *
 * Frames travel in batches (a file chunk, a time slice of a replay, one WebSocket message), so the
 * framework's per-item cost is paid once per batch, not once per sample.
 */
import type { RegionKey } from '../model/regions.ts';
import type { RejectReason } from './reasons.ts';
import type { CalibrationSpec, MuscleCalibration } from '../model/calibration.ts';

export type Side = 'left' | 'right';
export const SIDES = ['left', 'right'] as const satisfies readonly Side[];

export type GaitEventName = 'foot_strike' | 'toe_off';
export const GAIT_EVENT_NAMES = ['foot_strike', 'toe_off'] as const satisfies readonly GaitEventName[];

/**
 * One fascicle sample. Created once by the parser and enriched in place by later stages (no copy per
 * stage): the enrichment fields start as NaN / null and are filled by the stage named beside them.
 */
export interface Sample {
  readonly kind: 'sample';
  /** Device clock, seconds. */
  readonly tS: number;
  readonly muscle: string;
  readonly fascicleMm: number;
  /** NaN when the device sent none. */
  readonly pennationDeg: number;
  /** Tracking quality in [0, 1]; 1 when the device sent none. */
  readonly quality: number;
  /** Activation in [0, 1] (e.g. a normalised EMG envelope); NaN when the device sent none. */
  readonly activation: number;
  /** 1-based line (file) or message index (live) the sample came from. */
  readonly line: number;

  /** gateQuality: the filter should weigh this sample down or skip it. */
  lowQuality: boolean;
  /** smoothKalman: smoothed fascicle length (mm). */
  smoothMm: number;
  /** estimateVelocity: fascicle velocity of the smoothed signal (mm/s, positive = lengthening). */
  velocityMmS: number;
  /** convertSarcomere: estimated sarcomere length (µm). */
  sarcomereUm: number;
  /** evaluateForceLength: relative active force from length alone, 0–1. */
  force: number;
  /** evaluateForceLength: region of the geometric curve. */
  region: RegionKey | null;
  /** evaluateCapacity: relative force capacity from length × velocity (force × force–velocity factor), 0–1.5. */
  forceLv: number;
  /** evaluateCapacity: the length × velocity capacity along the tendon (× cos pennation). */
  forceTendon: number;
  /** segmentStrides: 0-based stride of this muscle, -1 before its first foot strike. */
  strideIndex: number;
}

export interface GaitEvent {
  readonly kind: 'event';
  readonly tS: number;
  readonly event: GaitEventName;
  readonly side: Side;
  readonly line: number;
}

export interface Marker {
  readonly kind: 'marker';
  readonly tS: number;
  readonly marker: string;
  readonly line: number;
}

/**
 * A live connection was lost. The live adapters say it in the data's own path and the session log keeps it
 * as a line of its own, so every run of that data (live, a replay of the log) restarts its filters at the
 * same place: `restoreGaps` turns it into `disconnected` Gaps.
 */
export interface Disconnection {
  readonly kind: 'disconnection';
  /** Device time of the last sample or gait event the connection carried (NaN when it carried none). */
  readonly tS: number;
  /** The muscles the connection carried (one device of several); null: every muscle (the one peer). */
  readonly muscles: readonly string[] | null;
  /** What ended the connection (close code, reason, ping), one line. */
  readonly detail: string;
  readonly line: number;
}

/**
 * A live device whose clock restarted: its connection began with a header and then went back in time.
 * From this record on, that device's times are its own plus `offsetS`, which continues the session's
 * timeline, and there is a gap. The live adapters say it; the session log keeps it (with the times
 * already shifted), so every replay of the log restarts filters at the same place; `restoreGaps` turns
 * it into Gaps and says it once as a Notice.
 */
export interface ClockReset {
  readonly kind: 'clock_reset';
  /** Session time of the device's first record after the restart. */
  readonly tS: number;
  /** Added to the device's own times from here on, seconds. */
  readonly offsetS: number;
  /** The muscles the device carries; null: every muscle (the one peer). */
  readonly muscles: readonly string[] | null;
  /** What was seen, one line. */
  readonly detail: string;
  readonly line: number;
}

export interface MuscleDeclaration {
  readonly side?: Side;
}

export interface Header {
  readonly kind: 'header';
  readonly subject?: string;
  readonly trial?: string;
  readonly rateHz?: number;
  readonly muscles: Readonly<Record<string, MuscleDeclaration>>;
  readonly calibration?: CalibrationSpec;
  readonly line: number;
}

/** A line or message that is not a valid record. Counted, logged, never fatal. */
export interface Rejection {
  readonly kind: 'rejection';
  readonly reason: RejectReason;
  /** What failed, what is accepted, how to fix it. */
  readonly message: string;
  readonly line: number;
  /** The start of the offending input (at most 200 characters), for the log. */
  readonly excerpt: string;
  /** The column or key at fault, as the input names it, when one is. */
  readonly field?: string;
  /** How many rejected records it stands for (a session log's line for one reason); absent: one. */
  readonly count?: number;
  /** The file it came from, when several feed the trial (a trial description's recordings); absent: the trial's one file. */
  readonly file?: string;
}

/**
 * A stretch where the data stops being continuous: a Disconnection, or a forward time jump of one
 * muscle beyond the gap threshold. Filters reset across it; nothing is interpolated across it.
 */
export interface Gap {
  readonly kind: 'gap';
  readonly cause: 'disconnected' | 'time_jump';
  /** null: every muscle. */
  readonly muscle: string | null;
  /** Device time of the last sample before the gap (NaN when unknown). */
  readonly fromS: number;
  /** Device time of the first sample after the gap (NaN when unknown). */
  readonly toS: number;
}

/**
 * Said by convertSarcomere once it knows a muscle's calibration (from a file, the header, or the
 * uncalibrated baseline), so later stages and the summary learn it from the data's own path.
 */
export interface CalibrationApplied {
  readonly kind: 'calibration';
  readonly muscle: string;
  readonly calibration: MuscleCalibration;
  readonly sarcomeresInSeries: number;
  readonly source: 'file' | 'header' | 'baseline' | 'runtime';
}

/** Said by segmentStrides at each foot strike of a muscle's side: the previous stride ends, this one starts. */
export interface StrideBoundary {
  readonly kind: 'stride';
  readonly muscle: string;
  readonly side: Side;
  /** Index of the stride that starts here (0 for the first foot strike). */
  readonly index: number;
  readonly tS: number;
  /** How the boundary was found: a foot strike ('events', the default when absent) or the fascicle signal itself. */
  readonly segmentation?: 'events' | 'estimated';
}

/** Something a person should know, said once by the stage that found it (side assumed, baseline used, …). */
export interface Notice {
  readonly kind: 'notice';
  readonly muscle: string | null;
  readonly text: string;
}

/** Records that come from the input, one per line or message element. */
export type InputFrame = Sample | GaitEvent | Marker | Disconnection | ClockReset | Header | Rejection;
/** Records the pipeline adds on the way. */
export type DerivedFrame = Gap | CalibrationApplied | StrideBoundary | Notice;
export type Frame = InputFrame | DerivedFrame;
export type Batch = Frame[];

/** Builds a Sample with its enrichment fields unset; the one place samples are created. */
export function makeSample(
  tS: number,
  muscle: string,
  fascicleMm: number,
  pennationDeg: number,
  quality: number,
  line: number,
  activation: number = Number.NaN,
): Sample {
  return {
    kind: 'sample',
    tS,
    muscle,
    fascicleMm,
    pennationDeg,
    quality,
    activation,
    line,
    lowQuality: false,
    smoothMm: Number.NaN,
    velocityMmS: Number.NaN,
    sarcomereUm: Number.NaN,
    force: Number.NaN,
    region: null,
    forceLv: Number.NaN,
    forceTendon: Number.NaN,
    strideIndex: -1,
  };
}

/** A sample as a rejection's excerpt shows it: its time, muscle and fascicle length, at most 200 characters. */
export function sampleExcerpt(s: Sample): string {
  return JSON.stringify({ t: s.tS, muscle: s.muscle, fascicle_mm: s.fascicleMm }).slice(0, 200);
}
