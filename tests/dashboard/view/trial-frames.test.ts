/** trialFrames on virtual time: bounded frame rate, ticks when quiet that are given only when they change the screen, errors shown, clean unsubscribe. */
import { describe, expect, it } from 'vitest';
import { EMPTY, NEVER, Subject, VirtualAction, VirtualTimeScheduler, throwError } from 'rxjs';
import { trialFrames, type TrialFrame } from '../../../src/dashboard/view/trial-frames.ts';
import type { RunStatus } from '../../../src/trial/run-status.ts';
import type { TrialState } from '../../../src/trial/state.ts';
import { pushSample, walkingState, walkThenFail } from '../fixtures.ts';

function clock() {
  const scheduler = new VirtualTimeScheduler(VirtualAction, Number.POSITIVE_INFINITY);
  const to = (ms: number): void => {
    scheduler.maxFrames = ms;
    scheduler.flush();
  };
  return { scheduler, to };
}

function collect(source: Parameters<typeof trialFrames>[0], status$?: Parameters<typeof trialFrames>[1]) {
  const { scheduler, to } = clock();
  const frames: { ms: number; frame: TrialFrame }[] = [];
  const sub = trialFrames(source, status$, { scheduler, frameMs: 80, tickMs: 250 }).subscribe((frame) => frames.push({ ms: scheduler.now(), frame }));
  return { frames, sub, to, scheduler };
}

/** The frames of a state stream of its own, collected on virtual time. */
function collectStates() {
  const state$ = new Subject<TrialState>();
  return { state$, ...collect(state$) };
}

/** The frames of a state stream and a status stream of their own, collected on virtual time. */
function collectStatesAndStatus() {
  const state$ = new Subject<TrialState>();
  const status$ = new Subject<RunStatus>();
  return { state$, status$, ...collect(state$, status$) };
}

describe('trialFrames', () => {
  it('gives an empty view when the trial has nothing yet, then nothing while nothing changes, and never completes by itself', () => {
    for (const source of [EMPTY, NEVER]) {
      const { frames, sub, to } = collect(source);
      to(300);
      expect(frames.length).toBeGreaterThanOrEqual(1);
      to(3000);
      const settled = frames.length;
      to(10_000);
      expect(frames).toHaveLength(settled);
      expect(frames.every((f) => f.frame.view.muscles.length === 0)).toBe(true);
      expect(sub.closed).toBe(false);
      sub.unsubscribe();
    }
  });

  it('gives a frame at each tick while a silence alert counts the seconds up', () => {
    const { state$, frames, to, sub } = collectStates();
    state$.next(walkingState());
    to(100);
    const before = frames.length;
    // Nothing more arrives: after a second every muscle is silent, and the alert says for how long.
    to(4000);
    const ticks = frames.slice(before).filter((f) => f.ms >= 2000);
    expect(ticks.length).toBeGreaterThanOrEqual(7);
    for (let i = 1; i < ticks.length; i++) expect(ticks[i]!.ms - ticks[i - 1]!.ms).toBe(250);
    sub.unsubscribe();
  });

  it("stops giving frames once an ended trial's screen has settled, and gives one again when the status changes", () => {
    const { state$, status$, frames, to, sub } = collectStatesAndStatus();
    const state = walkingState();
    state.ended = true;
    state$.next(state);
    state$.complete();
    // The rate falls to zero within its window, and the screen then stays as it is.
    to(4000);
    const settled = frames.length;
    expect(frames.at(-1)?.frame.view.samplesPerS).toBe(0);
    to(20_000);
    expect(frames).toHaveLength(settled);
    status$.next({ message: 'summary written' });
    to(20_200);
    expect(frames).toHaveLength(settled + 1);
    expect(frames.at(-1)?.frame.status.message).toBe('summary written');
    sub.unsubscribe();
  });

  it('shows one state one frame later', () => {
    const { state$, frames, to, sub } = collectStates();
    state$.next(walkingState());
    to(79);
    expect(frames).toHaveLength(0);
    to(100);
    expect(frames).toHaveLength(1);
    expect(frames[0]?.frame.view.muscles[0]?.latest?.sarcomereUm).toBe(2.71);
    sub.unsubscribe();
  });

  it('draws many states arriving within a frame as one frame, at most one per frame interval', () => {
    const { state$, frames, to, scheduler, sub } = collectStates();
    const state = walkingState();
    // A batch every 10 ms for a second.
    for (let ms = 0; ms < 1000; ms += 10) {
      scheduler.schedule(() => {
        pushSample(state, 'calf', { tS: 6 + ms / 1000, sarcomereUm: 2.5 + ms / 10_000 });
        state$.next(state);
      }, ms);
    }
    to(1000);
    expect(frames.length).toBeGreaterThanOrEqual(8);
    expect(frames.length).toBeLessThanOrEqual(13);
    for (let i = 1; i < frames.length; i++) expect(frames[i]!.ms - frames[i - 1]!.ms).toBeGreaterThanOrEqual(80);
    sub.unsubscribe();
  });

  it('keeps the last state and says why when the trial fails upstream', () => {
    const { state$, frames, to, sub } = collectStates();
    walkThenFail(state$, 'trial file vanished');
    to(500);
    const last = frames.at(-1)!.frame.view;
    expect(last.error).toBe('trial file vanished');
    expect(last.muscles[0]?.latest?.sarcomereUm).toBe(2.71);
    sub.unsubscribe();
    const failed = collect(throwError(() => 'not an Error'));
    failed.to(10);
    expect(failed.frames.at(-1)?.frame.view.error).toBe('not an Error');
    failed.sub.unsubscribe();
  });

  it('stops its timers and lets go of its sources when unsubscribed early', () => {
    const { state$, status$, frames, to, scheduler, sub } = collectStatesAndStatus();
    state$.next(walkingState());
    sub.unsubscribe();
    expect(state$.observed).toBe(false);
    expect(status$.observed).toBe(false);
    to(1000);
    expect(frames).toHaveLength(0);
    expect(scheduler.actions).toHaveLength(0);
  });

  it('merges status fields and keeps the last good status when the status stream fails', () => {
    const status$ = new Subject<RunStatus>();
    const { frames, to, sub } = collect(NEVER, status$);
    status$.next({ logPath: 'sessions/a.ndjson' });
    status$.next({ connection: { state: 'connected' } });
    to(100);
    expect(frames.at(-1)?.frame.status).toEqual({ logPath: 'sessions/a.ndjson', connection: { state: 'connected' } });
    status$.error(new Error('status gone'));
    to(600);
    expect(frames.at(-1)?.frame.status).toEqual({ logPath: 'sessions/a.ndjson', connection: { state: 'connected' } });
    expect(frames.at(-1)?.frame.view.error).toBeNull();
    sub.unsubscribe();
  });

  it('makes frames of plain data that survive a copy to another thread unchanged', () => {
    const { state$, frames, to, sub } = collectStates();
    state$.next(walkingState());
    to(100);
    const frame = frames.at(-1)!.frame;
    expect(structuredClone(frame)).toEqual(frame);
    sub.unsubscribe();
  });
});
