import fc from 'fast-check';
import { from, NEVER, Subject, type SchedulerLike, type Subscription } from 'rxjs';
import { TestScheduler } from 'rxjs/testing';
import { describe, expect, it } from 'vitest';
import { paceReplay, paceReplayWith, readAheadValve, type ReplaySpeed } from '../../src/pipeline/pace-replay.ts';
import { makeSample, type Batch, type Frame, type Header, type Rejection } from '../../src/trial/records.ts';

const s = (tS: number, line = 0): Frame => makeSample(tS, 'calf', 50, Number.NaN, 1, line);
const header: Header = { kind: 'header', muscles: {}, line: 1 };
const rejected: Rejection = { kind: 'rejection', reason: 'not_json', message: 'm', line: 2, excerpt: 'x' };

function testScheduler(): TestScheduler {
  return new TestScheduler((actual, expected) => expect(actual).toEqual(expected));
}

/** A scheduler that counts its timers still pending, to check that unsubscribing clears them. */
function countingScheduler(inner: SchedulerLike): { scheduler: SchedulerLike; pending: () => number } {
  let pending = 0;
  const scheduler: SchedulerLike = {
    now: () => inner.now(),
    schedule: (work, delay, state) => {
      pending++;
      // The overloads of schedule cannot be forwarded generically; the arguments pass through unchanged.
      const forward = inner.schedule as (this: SchedulerLike, w: unknown, d?: number, st?: unknown) => Subscription;
      const subscription = forward.call(inner, work, delay, state);
      subscription.add(() => pending--);
      return subscription;
    },
  };
  return { scheduler, pending: () => pending };
}

/** Checks what `paceReplay(speed)` releases, and when, of one batch of frames arriving at once (marbles as in TestScheduler). */
function expectPaced(frames: Batch, speed: ReplaySpeed, marbles: string, released: Record<string, Batch>): void {
  testScheduler().run(({ cold, expectObservable }) => {
    expectObservable(cold('(a|)', { a: frames }).pipe(paceReplay(speed))).toBe(marbles, released);
  });
}

describe('paceReplay', () => {
  it('passes batches through untouched and at once at speed max', () => {
    testScheduler().run(({ cold, expectObservable }) => {
      const a = [s(0), s(100)];
      const b = [s(200)];
      expectObservable(cold('a-b|', { a, b }).pipe(paceReplay('max'))).toBe('a-b|', { a, b });
    });
  });

  it('completes at once for an empty source', () => {
    testScheduler().run(({ cold, expectObservable }) => {
      expectObservable(cold<Batch>('|').pipe(paceReplay(1))).toBe('|');
    });
  });

  it('releases one frame at once', () => {
    const f = s(12.5);
    expectPaced([f], 1, '(a|)', { a: [f] });
  });

  it('releases frames in real time at speed 1', () => {
    const [f0, f1, f2] = [s(10), s(10.5), s(11)];
    expectPaced([f0, f1, f2], 1, 'a 499ms b 499ms (c|)', { a: [f0], b: [f1], c: [f2] });
  });

  it('releases frames four times faster at speed 4', () => {
    const [f0, f1, f2] = [s(0), s(0.5), s(1)];
    expectPaced([f0, f1, f2], 4, 'a 124ms b 124ms (c|)', { a: [f0], b: [f1], c: [f2] });
  });

  it('re-slices a batch into slices of device time, never releasing a frame early', () => {
    const ts = testScheduler();
    ts.run(() => {
      const frames = Array.from({ length: 101 }, (_, i) => s(i / 100, i));
      const released: Array<{ atMs: number; frames: Batch }> = [];
      from([frames])
        .pipe(paceReplay(1, ts, { sliceS: 0.1 }))
        .subscribe((batch) => released.push({ atMs: ts.now(), frames: batch }));
      ts.flush();
      expect(released.flatMap((r) => r.frames)).toEqual(frames);
      expect(released.length).toBeGreaterThanOrEqual(10);
      expect(released.length).toBeLessThanOrEqual(12);
      for (const r of released) {
        for (const f of r.frames) {
          const dueMs = (f.kind === 'sample' ? f.tS : 0) * 1000;
          expect(r.atMs).toBeGreaterThanOrEqual(dueMs - 1e-6);
          expect(r.atMs - dueMs).toBeLessThanOrEqual(100 + 1e-6);
        }
      }
    });
  });

  it('sends frames without a time (headers, rejections) with the frame before them', () => {
    const [f0, f1] = [s(0), s(1)];
    expectPaced([header, f0, rejected, f1, header], 1, 'a 999ms (b|)', { a: [header, f0, rejected], b: [f1, header] });
  });

  it('waits at most 2 s of wall time for a forward jump, then paces on from there', () => {
    const [f0, f1, f2] = [s(0), s(3600), s(3601)];
    expectPaced([f0, f1, f2], 1, 'a 1999ms b 999ms (c|)', { a: [f0], b: [f1], c: [f2] });
  });

  it('does not wait on time going backwards, and restarts the clock after a big step back', () => {
    const [f0, back, f2, f3] = [s(100), s(99.99), s(5), s(5.5)];
    expectPaced([f0, back, f2, f3], 1, 'a 499ms (b|)', { a: [f0, back, f2], b: [f3] });
  });

  it('releases at once frames that arrive after their time is due', () => {
    testScheduler().run(({ cold, expectObservable }) => {
      const [f0, f1] = [s(0), s(0.2)];
      expectObservable(cold('a 499ms b|', { a: [f0], b: [f1] }).pipe(paceReplay(1))).toBe('a 499ms b|', { a: [f0], b: [f1] });
    });
  });

  it('completes only when every frame is released', () => {
    const [f0, f1] = [s(0), s(1)];
    expectPaced([f0, f1], 2, 'a 499ms (b|)', { a: [f0], b: [f1] });
  });

  it('passes an error from upstream on at once', () => {
    testScheduler().run(({ cold, expectObservable }) => {
      const [f0, f1] = [s(0), s(1)];
      expectObservable(cold('a 99ms #', { a: [f0, f1] }, new Error('disk')).pipe(paceReplay(1))).toBe('a 99ms #', { a: [f0] }, new Error('disk'));
    });
  });

  it('never completes for a source that never ends', () => {
    testScheduler().run(({ expectObservable }) => {
      expectObservable(NEVER.pipe(paceReplay(1))).toBe('');
    });
  });

  it('unsubscribes the source and clears its timer when unsubscribed early', () => {
    const ts = testScheduler();
    const { scheduler, pending } = countingScheduler(ts);
    ts.run(({ cold, expectObservable, expectSubscriptions }) => {
      const [f0, f1] = [s(0), s(1)];
      const source = cold('(a|)', { a: [f0, f1] });
      expectObservable(source.pipe(paceReplay(1, scheduler)), '^ 600ms !').toBe('a', { a: [f0] });
      expectSubscriptions(source.subscriptions).toBe('(^!)');
    });
    expect(pending()).toBe(0);

    const live = new Subject<Batch>();
    const released: Batch[] = [];
    const subscription = live.pipe(paceReplay(1, scheduler)).subscribe((b) => released.push(b));
    live.next([s(0), s(1)]);
    expect(pending()).toBe(1);
    subscription.unsubscribe();
    expect(pending()).toBe(0);
    expect(live.observed).toBe(false);
  });

  it('refuses a speed that is not a number > 0 or max', () => {
    expect(() => paceReplay(0)).toThrow(/speed is 0: must be a finite number > 0/);
    expect(() => paceReplay(-2)).toThrow(RangeError);
    expect(() => paceReplay(Number.NaN)).toThrow(RangeError);
    expect(() => paceReplay(Infinity)).toThrow(RangeError);
    expect(() => paceReplay(1, undefined, { maxWaitS: 0 })).toThrow(/maxWaitS is 0/);
  });

  it('never drops, duplicates or reorders frames, whatever their times and the speed', () => {
    const timed = fc.oneof(
      { weight: 6, arbitrary: fc.double({ min: -5, max: 5, noNaN: true }) },
      { weight: 1, arbitrary: fc.constantFrom(1e6, -1e6, 0) },
    );
    const frame = fc.oneof(
      { weight: 8, arbitrary: timed.map((t) => s(t)) },
      { weight: 1, arbitrary: fc.constant(null) },
    );
    const batches = fc.array(fc.array(frame, { maxLength: 8 }), { maxLength: 6 });
    const speed = fc.oneof(fc.constant<ReplaySpeed>('max'), fc.double({ min: 0.1, max: 50, noNaN: true }));
    fc.assert(
      fc.property(batches, speed, fc.array(fc.integer({ min: 0, max: 3000 }), { maxLength: 6 }), (shape, v, gapsMs) => {
        // Fresh frame objects, so identity tells duplicates apart.
        const input: Batch[] = shape.map((b) => b.map((f, i) => (f === null ? { ...header, line: i } : s((f as { tS: number }).tS))));
        const ts = testScheduler();
        const output: Frame[] = [];
        let completed = false;
        ts.run(({ cold }) => {
          let marbles = '';
          const values: Record<string, Batch> = {};
          input.forEach((b, i) => {
            const key = String.fromCharCode(97 + i);
            values[key] = b;
            marbles += `${key} ${gapsMs[i] ?? 0}ms `;
          });
          cold(`${marbles}|`, values)
            .pipe(paceReplay(v, ts))
            .subscribe({ next: (b) => output.push(...b), complete: () => (completed = true) });
        });
        expect(completed).toBe(true);
        const flat = input.flat();
        expect(output).toHaveLength(flat.length);
        output.forEach((f, i) => expect(f).toBe(flat[i]));
      }),
      { numRuns: 300 },
    );
  });
});

describe('backlog and read-ahead', () => {
  it('reports the frames waiting each time their number changes', () => {
    const ts = testScheduler();
    const reports: Array<[number, number]> = [];
    ts.run(({ cold }) => {
      cold('(a|)', { a: [s(0), s(1), s(2)] })
        .pipe(paceReplay(1, ts, { onBacklog: (n) => reports.push([ts.now(), n]) }))
        .subscribe();
    });
    expect(reports).toEqual([
      [0, 2],
      [1000, 1],
      [2000, 0],
    ]);
  });

  it('pauses reading at the high mark and resumes at the low mark', () => {
    const valve = readAheadValve(10, 2);
    const seen: boolean[] = [];
    valve.pause$.subscribe((p) => seen.push(p));
    for (const n of [5, 10, 12, 6, 3, 2, 0, 11]) valve.report(n);
    expect(seen).toEqual([false, true, false, true]);
    expect(() => readAheadValve(5, 5)).toThrow(RangeError);
  });
});

describe('paceReplayWith', () => {
  it('takes a new speed at once, from the device time reached', () => {
    testScheduler().run(({ cold, hot, expectObservable }) => {
      const frames = [s(0), s(1), s(2), s(3)];
      const speed$ = hot<ReplaySpeed>('a 1499ms b', { a: 1, b: 4 });
      // 1 s at speed 1 (frame 1 at 1000 ms); at 1500 ms device time is 1.5; then 0.5 s of device time takes 125 ms.
      expectObservable(cold('(a|)', { a: frames }).pipe(paceReplayWith(speed$))).toBe('a 999ms b 624ms c 249ms (d|)', {
        a: [frames[0]],
        b: [frames[1]],
        c: [frames[2]],
        d: [frames[3]],
      });
    });
  });

  it('releases everything waiting when the speed becomes max', () => {
    testScheduler().run(({ cold, hot, expectObservable }) => {
      const frames = [s(0), s(10), s(20)];
      const speed$ = hot<ReplaySpeed>('a 99ms b', { a: 1, b: 'max' });
      expectObservable(cold('(a|)', { a: frames }).pipe(paceReplayWith(speed$))).toBe('a 99ms (b|)', {
        a: [frames[0]],
        b: [frames[1], frames[2]],
      });
    });
  });

  it('pauses at speed 0 and goes on where it was', () => {
    testScheduler().run(({ cold, hot, expectObservable }) => {
      const frames = [s(0), s(1)];
      const speed$ = hot<ReplaySpeed>('a 499ms p 999ms r', { a: 1, p: 0, r: 1 });
      expectObservable(cold('(a|)', { a: frames }).pipe(paceReplayWith(speed$))).toBe('a 1999ms (b|)', {
        a: [frames[0]],
        b: [frames[1]],
      });
    });
  });

  it('releases nothing before the first speed', () => {
    testScheduler().run(({ cold, hot, expectObservable }) => {
      const f = s(0);
      expectObservable(cold('(a|)', { a: [f] }).pipe(paceReplayWith(hot<ReplaySpeed>('--a', { a: 1 })))).toBe('--(a|)', { a: [f] });
    });
  });

  it('errors when the speed stream errors or gives a bad speed', () => {
    testScheduler().run(({ cold, hot, expectObservable }) => {
      const source = cold<Batch>('(a|)', { a: [s(0), s(5)] });
      expectObservable(source.pipe(paceReplayWith(hot<ReplaySpeed>('a-#', { a: 1 }, new Error('keys'))))).toBe('a-#', { a: [s(0)] }, new Error('keys'));
      const bad = source.pipe(paceReplayWith(hot<ReplaySpeed>('a-b', { a: 1, b: -1 })));
      expectObservable(bad).toBe(
        'a-#',
        { a: [s(0)] },
        new RangeError("paceReplay: speed is -1: must be a finite number > 0 (1 = real time, 4 = four times faster), 0 to pause or 'max'"),
      );
    });
  });
});
