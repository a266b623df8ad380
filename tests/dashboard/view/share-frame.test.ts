import { describe, expect, it } from 'vitest';
import { NEVER, Subject, VirtualAction, VirtualTimeScheduler } from 'rxjs';
import { shareFrame } from '../../../src/dashboard/view/share-frame.ts';
import { firstFrame, trialFrames, type TrialFrame } from '../../../src/dashboard/view/trial-frames.ts';
import type { TrialState } from '../../../src/trial/state.ts';
import { completeStride, pushSample, walkingState } from '../fixtures.ts';

/** The frames of a state, each copied as to another thread. */
function copiedFrames(): { next: (state: TrialState) => TrialFrame } {
  const scheduler = new VirtualTimeScheduler(VirtualAction, Number.POSITIVE_INFINITY);
  const state$ = new Subject<TrialState>();
  let last: TrialFrame | null = null;
  trialFrames(state$, NEVER, { scheduler, frameMs: 80 }).subscribe((f) => (last = structuredClone(f)));
  return {
    next: (state) => {
      state$.next(state);
      scheduler.maxFrames = scheduler.frame + 100;
      scheduler.flush();
      if (last === null) throw new Error('no frame');
      return last;
    },
  };
}

describe('shareFrame', () => {
  it('passes the first frame and an empty one through as they are', () => {
    const frame = firstFrame(0);
    expect(shareFrame(null, frame)).toBe(frame);
    expect(shareFrame(frame, firstFrame(10)).view.muscles).toEqual([]);
  });

  it('keeps the curve and strides of the frame before when their values are unchanged, and takes the new figures', () => {
    const state = walkingState();
    const frames = copiedFrames();
    const a = shareFrame(null, frames.next(state));
    pushSample(state, 'calf', { tS: 6, sarcomereUm: 3.02 });
    const copied = frames.next(state);
    const b = shareFrame(a, copied);
    const [ca, cb] = [a.view.muscles[0]!, b.view.muscles[0]!];
    expect(cb.curve).toBe(ca.curve);
    expect(cb.strides).toBe(ca.strides);
    expect(cb.latest?.sarcomereUm).toBe(3.02);
    expect(b).toEqual(copied);
  });

  it('takes the new strides when a stride completes', () => {
    const state = walkingState();
    const frames = copiedFrames();
    const a = shareFrame(null, frames.next(state));
    completeStride(state, 'calf', { slMinUm: 2.2, slMaxUm: 3.1 });
    const b = shareFrame(a, frames.next(state));
    expect(b.view.muscles[0]!.strides).not.toBe(a.view.muscles[0]!.strides);
    expect(b.view.muscles[0]!.strides.length).toBe(a.view.muscles[0]!.strides.length + 1);
    expect(b.view.muscles[0]!.curve).toBe(a.view.muscles[0]!.curve);
  });

  it('keeps the status of the frame before while its values are unchanged, and takes a new one', () => {
    const frame = firstFrame(0);
    const a = shareFrame(null, { ...frame, status: { replay: { progress: 0.5, speed: 2 }, logPath: 'sessions/a.ndjson' } });
    const b = shareFrame(a, structuredClone({ ...frame, status: { replay: { progress: 0.5, speed: 2 }, logPath: 'sessions/a.ndjson' } }));
    expect(b.status).toBe(a.status);
    const c = shareFrame(b, structuredClone({ ...frame, status: { replay: { progress: 0.75, speed: 2 }, logPath: 'sessions/a.ndjson' } }));
    expect(c.status).not.toBe(b.status);
    expect(c.status.replay?.progress).toBe(0.75);
  });
});
