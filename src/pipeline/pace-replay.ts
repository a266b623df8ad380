/**
 * Replays recorded frames at the pace of their device time: speed 1 is real time, 4 four times faster,
 * 'max' as fast as possible (a pass-through, no timers). Frames are released in order, in slices, when
 * their device time is due; frames without a time (headers, rejections, gaps) go with the frame before.
 *
 * - A forward jump of device time is not waited out in full: one wait lasts at most maxWaitS of wall
 *   time (2 s by default), then the clock moves on to the next frame.
 * - Time going backwards is not waited on: such frames are released at once, and a step back of more
 *   than rewindS (1 s by default: a new take, a device restart) restarts the clock at that frame.
 * - An error from upstream is passed on at once (frames still waiting are dropped); completion waits
 *   until every frame is released.
 * - Upstream is not slowed down by this stage: frames a file source reads ahead of their time wait
 *   here. To keep a large file from being read into memory ahead of time, pair the stage with a
 *   readAheadValve (its pause$ goes to the file reader, its report to onBacklog).
 */
import {
  asyncScheduler,
  BehaviorSubject,
  distinctUntilChanged,
  Observable,
  of,
  type OperatorFunction,
  type SchedulerLike,
  type Subscription,
} from 'rxjs';
import type { Batch, Frame } from '../trial/records.ts';

export type ReplaySpeed = number | 'max';

export interface PaceReplayOptions {
  /**
   * Device time of one released slice at most, seconds: after a release the next wake comes no sooner
   * than this much device time later, so frames are at most one slice late. @default 1/60
   */
  readonly sliceS?: number;
  /** Longest wall-clock wait for one forward jump of device time, seconds. @default 2 */
  readonly maxWaitS?: number;
  /** A step back in device time larger than this (seconds) restarts the clock at that frame. @default 1 */
  readonly rewindS?: number;
  /** Told the number of frames waiting to be released, each time it changes. */
  readonly onBacklog?: (framesWaiting: number) => void;
}

/** A pause signal for a file reader, driven by how many frames wait in a paced replay. */
export interface ReadAheadValve {
  /** true while the reader should stop reading. */
  readonly pause$: Observable<boolean>;
  /** Give it to paceReplay as onBacklog. */
  readonly report: (framesWaiting: number) => void;
}

/**
 * Pauses reading when highFrames frames wait, resumes when no more than lowFrames do. At about 200
 * bytes a sample, the default keeps a replay's read-ahead to some tens of megabytes.
 */
export function readAheadValve(highFrames = 200_000, lowFrames = Math.floor(highFrames / 4)): ReadAheadValve {
  if (!(highFrames >= 1) || !(lowFrames >= 0) || lowFrames >= highFrames) {
    throw new RangeError(`readAheadValve: highFrames ${highFrames} and lowFrames ${lowFrames}: need 0 ≤ lowFrames < highFrames`);
  }
  const paused = new BehaviorSubject(false);
  return {
    pause$: paused.pipe(distinctUntilChanged()),
    report: (framesWaiting) => {
      if (framesWaiting >= highFrames) paused.next(true);
      else if (framesWaiting <= lowFrames) paused.next(false);
    },
  };
}

function checkSpeed(speed: unknown, allowPause: boolean): ReplaySpeed {
  if (speed === 'max') return speed;
  if (typeof speed === 'number' && Number.isFinite(speed) && (speed > 0 || (allowPause && speed === 0))) return speed;
  throw new RangeError(
    `paceReplay: speed is ${String(speed)}: must be a finite number > 0 (1 = real time, 4 = four times faster)` +
      `${allowPause ? ', 0 to pause' : ''} or 'max'`,
  );
}

function positive(name: string, value: number): number {
  if (!(value > 0) || !Number.isFinite(value)) throw new RangeError(`paceReplay: ${name} is ${value}: must be a finite number > 0 (seconds)`);
  return value;
}

/** Device time of a frame, seconds; NaN for frames that carry none. */
function frameTimeS(frame: Frame): number {
  switch (frame.kind) {
    case 'sample':
    case 'event':
    case 'marker':
    case 'disconnection':
    case 'clock_reset':
      return frame.tS;
    default:
      return Number.NaN;
  }
}

/** Paces batches by their device time at a fixed speed. */
export function paceReplay(
  speed: ReplaySpeed,
  scheduler: SchedulerLike = asyncScheduler,
  options: PaceReplayOptions = {},
): OperatorFunction<Batch, Batch> {
  if (checkSpeed(speed, false) === 'max') return (source) => source;
  return paceReplayWith(of(speed), scheduler, options);
}

/**
 * Paces batches by their device time at the speed speed$ gives last (so it can change while playing).
 * Nothing is released before speed$ gives its first speed; 0 pauses; a new speed takes effect at once,
 * from the device time reached. speed$ completing keeps the last speed; speed$ erroring (or giving a
 * speed that is not a finite number ≥ 0 or 'max') errors the output.
 */
export function paceReplayWith(
  speed$: Observable<ReplaySpeed>,
  scheduler: SchedulerLike = asyncScheduler,
  options: PaceReplayOptions = {},
): OperatorFunction<Batch, Batch> {
  const sliceS = positive('sliceS', options.sliceS ?? 1 / 60);
  const maxWaitMs = positive('maxWaitS', options.maxWaitS ?? 2) * 1000;
  const rewindS = positive('rewindS', options.rewindS ?? 1);
  const onBacklog = options.onBacklog;

  return (source) =>
    new Observable<Batch>((subscriber) => {
      let speed: ReplaySpeed | null = null;
      let queue: Frame[] = [];
      let head = 0;
      let sourceDone = false;
      // The clock: device time anchorDeviceS was reached at wall time anchorWallMs.
      let anchored = false;
      let anchorDeviceS = 0;
      let anchorWallMs = 0;
      // Set when a capped wait for a forward jump is under way: the device time to move on to.
      let jumpToS = Number.NaN;
      let timer: Subscription | null = null;

      const deviceNowS = (nowMs: number): number => anchorDeviceS + ((nowMs - anchorWallMs) / 1000) * (speed as number);

      let reported = 0;
      const report = (): void => {
        const waiting = queue.length - head;
        if (onBacklog !== undefined && waiting !== reported) {
          reported = waiting;
          onBacklog(waiting);
        }
      };

      const compact = (): void => {
        if (head === queue.length) {
          queue = [];
          head = 0;
        } else if (head > 4096 && head * 2 > queue.length) {
          queue = queue.slice(head);
          head = 0;
        }
      };

      const finishIfDone = (): void => {
        if (sourceDone && head === queue.length && !subscriber.closed) subscriber.complete();
      };

      const drain = (): void => {
        timer = null;
        if (speed === null || subscriber.closed) return;
        if (speed === 'max') {
          if (head < queue.length) {
            const out = head === 0 ? queue : queue.slice(head);
            queue = [];
            head = 0;
            report();
            subscriber.next(out);
          }
          finishIfDone();
          return;
        }
        const nowMs = scheduler.now();
        if (!Number.isNaN(jumpToS)) {
          anchorDeviceS = jumpToS;
          anchorWallMs = nowMs;
          jumpToS = Number.NaN;
        }
        const out: Frame[] = [];
        let waitMs = -1;
        while (head < queue.length) {
          const frame = queue[head] as Frame;
          const tS = frameTimeS(frame);
          if (tS - tS !== 0) {
            out.push(frame);
            head++;
            continue;
          }
          if (!anchored) {
            anchored = true;
            anchorDeviceS = tS;
            anchorWallMs = nowMs;
          }
          const nowS = deviceNowS(nowMs);
          if (tS <= nowS) {
            if (tS < nowS - rewindS) {
              anchorDeviceS = tS;
              anchorWallMs = nowMs;
            }
            out.push(frame);
            head++;
            continue;
          }
          if (speed === 0) break;
          const untilDueMs = ((tS - nowS) / speed) * 1000;
          if (untilDueMs > maxWaitMs) {
            waitMs = maxWaitMs;
            jumpToS = tS;
          } else {
            waitMs = Math.max(untilDueMs, (sliceS / speed) * 1000);
          }
          break;
        }
        compact();
        report();
        if (out.length > 0) subscriber.next(out);
        if (subscriber.closed) return;
        if (waitMs >= 0) timer = scheduler.schedule(drain, waitMs);
        finishIfDone();
      };

      const restart = (): void => {
        timer?.unsubscribe();
        timer = null;
        drain();
      };

      const speedSubscription = speed$.subscribe({
        next: (value) => {
          let next: ReplaySpeed;
          try {
            next = checkSpeed(value, true);
          } catch (error) {
            subscriber.error(error);
            return;
          }
          if (typeof speed === 'number' && anchored) {
            const nowMs = scheduler.now();
            anchorDeviceS = deviceNowS(nowMs);
            anchorWallMs = nowMs;
          }
          // Leaving 'max', the clock starts again at the next frame.
          if (speed === 'max' || speed === null) anchored = false;
          jumpToS = Number.NaN;
          speed = next;
          restart();
        },
        error: (error: unknown) => subscriber.error(error),
      });
      const sourceSubscription = source.subscribe({
        next: (batch) => {
          if (speed === 'max' && head === queue.length) {
            subscriber.next(batch);
            return;
          }
          for (let i = 0; i < batch.length; i++) queue.push(batch[i] as Frame);
          if (timer === null) drain();
          report();
        },
        error: (error: unknown) => subscriber.error(error),
        complete: () => {
          sourceDone = true;
          finishIfDone();
        },
      });

      return () => {
        timer?.unsubscribe();
        timer = null;
        speedSubscription.unsubscribe();
        sourceSubscription.unsubscribe();
        queue = [];
        head = 0;
      };
    });
}
