/** sameScreen: two frames are the same screen when what they show is the same, whatever the wall clock says. */
import { describe, expect, it } from 'vitest';
import { sameScreen } from '../../../src/dashboard/view/same-screen.ts';
import { createTracker, observeTrial, type Tracker } from '../../../src/dashboard/view/view-model.ts';
import type { TrialFrame } from '../../../src/dashboard/view/trial-frames.ts';
import type { TrialState } from '../../../src/trial/state.ts';
import { pushSample, walkingState } from '../fixtures.ts';

const frameAt = (tracker: Tracker, state: TrialState, nowMs: number): TrialFrame => ({ view: observeTrial(tracker, state, nowMs), status: {} });

describe('sameScreen', () => {
  it("holds an ended trial's frames the same whatever their wall-clock time, once its rate has settled", () => {
    const state = walkingState();
    state.ended = true;
    const tracker = createTracker();
    const [, , a, b] = [0, 3000, 6000, 9000].map((ms) => frameAt(tracker, state, ms));
    expect(a!.view.wallMs).not.toBe(b!.view.wallMs);
    expect(sameScreen(a!, b!)).toBe(true);
    expect(sameScreen(a!, a!)).toBe(true);
  });

  it("tells a live trial's silent frames apart: the no-samples alert counts the seconds", () => {
    const state = walkingState();
    const tracker = createTracker();
    const [, , a, b] = [0, 3000, 6000, 6500].map((ms) => frameAt(tracker, state, ms));
    // The rate has settled at zero in both; only the alert's count of seconds differs.
    expect(a!.view.samplesPerS).toBe(0);
    expect(b!.view.samplesPerS).toBe(0);
    expect(sameScreen(a!, b!)).toBe(false);
  });

  it('tells frames apart by a new sample or a new status, and not by equal statuses', () => {
    const state = walkingState();
    const tracker = createTracker();
    const a = frameAt(tracker, state, 0);
    const b = frameAt(tracker, state, 100);
    pushSample(state, 'calf', { tS: 5.002, sarcomereUm: 2.9 });
    const c = frameAt(tracker, state, 200);
    expect(sameScreen(a, b)).toBe(true);
    expect(sameScreen(b, c)).toBe(false);
    expect(sameScreen(b, { ...b, status: { message: 'calibration applied to calf' } })).toBe(false);
    expect(sameScreen({ ...b, status: { logPath: 'a.log' } }, { ...b, status: { logPath: 'a.log' } })).toBe(true);
  });
});
