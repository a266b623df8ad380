import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { BehaviorSubject, lastValueFrom, Observable, Subject, toArray } from 'rxjs';
import { mergeByTime, type PausableSource } from '../../adapters/merge-by-time.ts';
import type { Batch, Frame } from '../../src/trial/records.ts';
import { header, sample, strike } from '../helpers/frames.ts';

function rejection(line: number): Frame {
  return { kind: 'rejection', reason: 'not_json', message: 'not JSON', line, excerpt: '' };
}

/** A recording given as batches, all at once. */
function given(...batches: Batch[]): PausableSource {
  return () =>
    new Observable<Batch>((subscriber) => {
      for (const b of batches) subscriber.next(b);
      subscriber.complete();
    });
}

/** Each frame as "muscle@t" (samples), "event@t", "header", "rejection:line". */
function said(frames: readonly Frame[]): string[] {
  return frames.map((f) => (f.kind === 'sample' ? `${f.muscle}@${f.tS}` : f.kind === 'event' ? `event@${f.tS}` : f.kind === 'rejection' ? `rejection:${f.line}` : f.kind));
}

async function merged(sources: readonly PausableSource[], highFrames?: number): Promise<Frame[]> {
  const batches = await lastValueFrom(mergeByTime(sources, highFrames !== undefined ? { highFrames } : {}).pipe(toArray()));
  return batches.flat();
}

/**
 * A recording that gives its frames one batch at a time when pumped, and only while its pause signal is
 * off, as a file reader does; it counts what it gave.
 */
function pumped(frames: readonly Frame[], batchFrames: number): { readonly source: PausableSource; pump(): boolean; given: number; paused: boolean } {
  let emit: ((batch: Batch) => void) | null = null;
  let done: (() => void) | null = null;
  const state = {
    given: 0,
    paused: false,
    source: (pause$: Observable<boolean>): Observable<Batch> =>
      new Observable<Batch>((subscriber) => {
        const sub = pause$.subscribe((p) => (state.paused = p));
        emit = (b) => subscriber.next(b);
        done = () => subscriber.complete();
        return () => sub.unsubscribe();
      }),
    /** Gives the next batch unless paused or ended; true when it gave one. */
    pump(): boolean {
      if (state.paused || emit === null || done === null) return false;
      if (state.given >= frames.length) {
        done();
        done = null;
        return false;
      }
      const batch = frames.slice(state.given, state.given + batchFrames);
      state.given += batch.length;
      emit(batch);
      return true;
    },
  };
  return state;
}

describe('mergeByTime', () => {
  it('completes at once without recordings', async () => {
    expect(await merged([])).toEqual([]);
  });

  it('passes one recording through in its order', async () => {
    const frames = [header(), sample(0, 'calf', 50), rejection(3), sample(0.01, 'calf', 51)];
    expect(said(await merged([given(frames)]))).toEqual(['header', 'calf@0', 'rejection:3', 'calf@0.01']);
  });

  it('merges recordings in time order, equal times in the order of the recordings, frames without a time keeping their place', async () => {
    const calf = given([header(), sample(0, 'calf', 50), sample(0.02, 'calf', 50)], [rejection(4), sample(0.04, 'calf', 50)]);
    const thigh = given([sample(0.01, 'thigh', 80)], [sample(0.02, 'thigh', 80), strike(0.03, 'left'), sample(0.05, 'thigh', 80)]);
    expect(said(await merged([calf, thigh]))).toEqual([
      'header',
      'calf@0',
      'thigh@0.01',
      'calf@0.02',
      'rejection:4',
      'thigh@0.02',
      'event@0.03',
      'calf@0.04',
      'thigh@0.05',
    ]);
  });

  it('holds a recording back while another still open has nothing waiting, and lets it go once that one ends', () => {
    const a = new Subject<Batch>();
    const b = new Subject<Batch>();
    const out: string[] = [];
    let completed = false;
    mergeByTime([() => a, () => b]).subscribe({ next: (batch) => out.push(...said(batch)), complete: () => (completed = true) });
    a.next([sample(5, 'calf', 50), sample(6, 'calf', 50)]);
    expect(out).toEqual([]);
    b.next([rejection(1), sample(1, 'thigh', 80)]);
    expect(out).toEqual(['rejection:1', 'thigh@1']);
    b.complete();
    expect(out).toEqual(['rejection:1', 'thigh@1', 'calf@5', 'calf@6']);
    expect(completed).toBe(false);
    a.complete();
    expect(completed).toBe(true);
  });

  it('gives each recording\'s frames in its own order, merged by time, however they are cut into batches (property)', async () => {
    const recording = fc.array(fc.record({ dt: fc.integer({ min: 0, max: 3 }), untimed: fc.boolean() }), { maxLength: 40 });
    await fc.assert(
      fc.asyncProperty(fc.array(recording, { minLength: 1, maxLength: 4 }), fc.integer({ min: 1, max: 7 }), async (recordings, cut) => {
        // Each recording's times go forward (steps of 0–3 hundredths); some frames have no time.
        const framesOf = recordings.map((steps, r) => {
          let t = 0;
          return steps.map((s, i): Frame => {
            t += s.dt / 100;
            return s.untimed ? rejection(r * 1000 + i) : sample(t, `m${r}`, 50);
          });
        });
        const sources = framesOf.map((frames) => {
          const batches: Batch[] = [];
          for (let i = 0; i < frames.length; i += cut) batches.push(frames.slice(i, i + cut));
          return given(...batches);
        });
        const out = await merged(sources, 3);
        expect(out).toHaveLength(framesOf.flat().length);
        // Each recording's frames come out in their own order.
        for (const frames of framesOf) expect(out.filter((f) => frames.includes(f))).toEqual(frames);
        // Timed frames come out in time order, equal times in the order of the recordings.
        const timed = out.filter((f) => f.kind === 'sample');
        const key = (f: Frame): [number, number] => (f.kind === 'sample' ? [f.tS, Number(f.muscle.slice(1))] : [0, 0]);
        for (let i = 1; i < timed.length; i++) {
          const [t0, r0] = key(timed[i - 1] as Frame);
          const [t1, r1] = key(timed[i] as Frame);
          expect(t0 < t1 || (t0 === t1 && r0 <= r1)).toBe(true);
        }
      }),
    );
  });

  it('pauses a recording whose clock is far ahead once highFrames of it wait, so what waits stays bounded by count', () => {
    const high = 50;
    const early = pumped(Array.from({ length: 2000 }, (_, i) => sample(i / 100, 'calf', 50)), 16);
    const late = pumped(Array.from({ length: 2000 }, (_, i) => sample(10_000 + i / 100, 'thigh', 80)), 16);
    let out = 0;
    let completed = false;
    let mostWaiting = 0;
    mergeByTime([early.source, late.source], { highFrames: high }).subscribe({ next: (b) => (out += b.length), complete: () => (completed = true) });
    for (let round = 0; round < 10_000 && !completed; round++) {
      early.pump();
      late.pump();
      mostWaiting = Math.max(mostWaiting, early.given + late.given - out);
    }
    expect(completed).toBe(true);
    expect(out).toBe(4000);
    // At most highFrames of the late recording, plus the batch that took it over, and a batch of the early one.
    expect(mostWaiting).toBeLessThanOrEqual(high + 2 * 16);
  });

  it('pauses every recording while the consumer asks for no more reading', () => {
    const a = pumped([sample(0, 'calf', 50)], 1);
    const b = pumped([sample(0, 'thigh', 80)], 1);
    const consumer = new BehaviorSubject(false);
    mergeByTime([a.source, b.source], { pause$: consumer }).subscribe();
    expect([a.paused, b.paused]).toEqual([false, false]);
    consumer.next(true);
    expect([a.paused, b.paused]).toEqual([true, true]);
    expect(a.pump()).toBe(false);
    consumer.next(false);
    expect(a.pump()).toBe(true);
  });

  it('passes a recording\'s error on and unsubscribes the others', () => {
    let closed = false;
    const quiet: PausableSource = () => new Observable<Batch>(() => () => (closed = true));
    const failing: PausableSource = () => new Observable<Batch>((s) => s.error(new Error('cannot read thigh.csv')));
    let seen: unknown = null;
    mergeByTime([quiet, failing]).subscribe({ error: (e: unknown) => (seen = e) });
    expect((seen as Error).message).toBe('cannot read thigh.csv');
    expect(closed).toBe(true);
  });

  it('unsubscribes every recording when unsubscribed early', () => {
    const closed: boolean[] = [false, false];
    const sources = closed.map((_, i): PausableSource => () => new Observable<Batch>(() => () => (closed[i] = true)));
    mergeByTime(sources).subscribe().unsubscribe();
    expect(closed).toEqual([true, true]);
  });

  it('refuses a read-ahead bound below one frame', () => {
    expect(() => mergeByTime([], { highFrames: 0 })).toThrow(/highFrames is 0: must be 1 or more/);
  });
});
