/**
 * Several recordings of one trial, each in its own file order on the joint clock → one stream in time
 * order: a k-way merge that reads each recording only as far as it needs.
 *
 * Each recording is opened with a pause signal of its own, on while `highFrames` of its frames wait here
 * (or while the consumer asks for no more reading, as a paced replay does): so however far apart the
 * recordings' clocks are, what waits is bounded by count, about `highFrames` frames and one read chunk
 * per recording, never by what a file claims. A frame goes out once every recording still open has a
 * frame waiting (or has ended) and none of them has an earlier one; equal times go out in the order of
 * the recordings. Frames without a time (headers, rejections) keep their place in their own recording:
 * they go out as soon as what came before them in it has gone.
 */
import { BehaviorSubject, distinctUntilChanged, Observable, type Subscription } from 'rxjs';
import type { Batch, Frame } from '../src/trial/records.ts';
import { MERGE_READ_AHEAD_FRAMES } from './limits.ts';

/** A recording's frames, read while its pause signal is off. */
export type PausableSource = (pause$: Observable<boolean>) => Observable<Batch>;

export interface MergeByTimeOptions {
  /** true while the consumer wants no more read (a paced replay's read-ahead valve); every recording pauses. */
  readonly pause$?: Observable<boolean>;
  /** Frames of one recording that may wait before it is paused. @default MERGE_READ_AHEAD_FRAMES */
  readonly highFrames?: number;
}

/** The time a frame is ordered by; NaN for frames that keep their place (no time, or none known). */
function timeOf(f: Frame): number {
  return f.kind === 'sample' || f.kind === 'event' || f.kind === 'marker' || f.kind === 'disconnection' || f.kind === 'clock_reset' ? f.tS : Number.NaN;
}

/** The frames of one recording waiting to go out, in their order, kept in the batches they came in. */
class FrameQueue {
  private batches: Frame[][] = [];
  private batch = 0;
  private index = 0;
  length = 0;

  push(frames: Frame[]): void {
    if (frames.length === 0) return;
    this.batches.push(frames);
    this.length += frames.length;
  }

  peek(): Frame {
    return (this.batches[this.batch] as Frame[])[this.index] as Frame;
  }

  shift(): Frame {
    const frames = this.batches[this.batch] as Frame[];
    const f = frames[this.index++] as Frame;
    this.length--;
    if (this.index === frames.length) {
      // A batch gone out is let go at once: a recording that always has frames waiting never empties its queue.
      this.index = 0;
      this.batch++;
      if (this.batch === this.batches.length) {
        this.batches = [];
        this.batch = 0;
      } else if (this.batch >= 64) {
        this.batches = this.batches.slice(this.batch);
        this.batch = 0;
      }
    }
    return f;
  }
}

export function mergeByTime(sources: readonly PausableSource[], options: MergeByTimeOptions = {}): Observable<Batch> {
  const high = options.highFrames ?? MERGE_READ_AHEAD_FRAMES;
  if (!(high >= 1)) throw new RangeError(`mergeByTime: highFrames is ${high}: must be 1 or more`);
  return new Observable<Batch>((subscriber) => {
    const n = sources.length;
    const queues = sources.map(() => new FrameQueue());
    const ended = sources.map(() => false);
    const pauses = sources.map(() => new BehaviorSubject(false));
    const subscriptions: Subscription[] = [];
    let consumerPaused = false;
    let draining = false;
    let again = false;

    const setPauses = (): void => {
      for (let i = 0; i < n; i++) {
        const paused = consumerPaused || (queues[i] as FrameQueue).length >= high;
        const p = pauses[i] as BehaviorSubject<boolean>;
        if (p.value !== paused) p.next(paused);
      }
    };

    /** Moves out every frame that can go now, in order. */
    const collect = (out: Frame[]): boolean => {
      let best = -1;
      let bestT = Number.POSITIVE_INFINITY;
      for (let i = 0; i < n; i++) {
        const q = queues[i] as FrameQueue;
        while (q.length > 0 && Number.isNaN(timeOf(q.peek()))) out.push(q.shift());
        if (q.length === 0) {
          // A recording still open with nothing waiting may yet have the earliest frame.
          if (!ended[i]) return false;
          continue;
        }
        const t = timeOf(q.peek());
        if (best < 0 || t < bestT) {
          best = i;
          bestT = t;
        }
      }
      if (best < 0) return false;
      // The earliest frame waiting in the other recordings bounds the run that goes out of this one.
      let boundT = Number.POSITIVE_INFINITY;
      let boundI = n;
      for (let j = 0; j < n; j++) {
        const q = queues[j] as FrameQueue;
        if (j === best || q.length === 0) continue;
        const t = timeOf(q.peek());
        if (t < boundT) {
          boundT = t;
          boundI = j;
        }
      }
      const q = queues[best] as FrameQueue;
      while (q.length > 0) {
        const t = timeOf(q.peek());
        if (t > boundT || (t === boundT && best > boundI)) break;
        out.push(q.shift());
      }
      return true;
    };

    const drain = (): void => {
      if (draining) {
        again = true;
        return;
      }
      draining = true;
      do {
        again = false;
        const out: Frame[] = [];
        while (collect(out));
        if (out.length > 0) subscriber.next(out);
        if (subscriber.closed) return;
        if (ended.every((e) => e) && queues.every((q) => q.length === 0)) {
          subscriber.complete();
          return;
        }
        setPauses();
      } while (again);
      draining = false;
    };

    if (options.pause$ !== undefined) {
      subscriptions.push(
        options.pause$.subscribe((paused) => {
          consumerPaused = paused;
          setPauses();
        }),
      );
    }
    for (let i = 0; i < n && !subscriber.closed; i++) {
      const source = sources[i] as PausableSource;
      subscriptions.push(
        source((pauses[i] as BehaviorSubject<boolean>).pipe(distinctUntilChanged())).subscribe({
          next: (batch) => {
            (queues[i] as FrameQueue).push(batch);
            drain();
          },
          error: (error: unknown) => subscriber.error(error),
          complete: () => {
            ended[i] = true;
            drain();
          },
        }),
      );
    }
    if (n === 0) subscriber.complete();
    return () => {
      for (const s of subscriptions) s.unsubscribe();
      for (const p of pauses) p.complete();
    };
  });
}
