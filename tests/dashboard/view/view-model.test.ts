import { describe, expect, it } from 'vitest';
import { createTracker, detectAlerts, HISTORY_SIZE, observeTrial, STRIDES_KEPT } from '../../../src/dashboard/view/view-model.ts';
import { completeStride, makeMuscle, makeTrialState, pushSample, walkingState } from '../fixtures.ts';

describe('observeTrial', () => {
  it('gives an empty view before any state', () => {
    const view = observeTrial(createTracker(), null, 0);
    expect(view.muscles).toEqual([]);
    expect(view.samplesPerS).toBeNaN();
    expect(detectAlerts(view, {}, true)).toEqual([]);
  });

  it('copies the numbers out, so later mutation of the state does not change a view', () => {
    const state = walkingState();
    const view = observeTrial(createTracker(), state, 0);
    pushSample(state, 'calf', { tS: 6, sarcomereUm: 3.1 });
    state.frames.accepted += 100;
    expect(view.muscles[0]?.latest?.sarcomereUm).toBe(2.71);
    expect(view.accepted).toBe(2);
    expect(view.elapsedS).toBe(5);
  });

  it('counts samples per wall second over the recent window', () => {
    const tracker = createTracker();
    const state = walkingState();
    observeTrial(tracker, state, 0);
    state.frames.accepted += 250;
    const view = observeTrial(tracker, state, 500);
    expect(view.samplesPerS).toBeCloseTo(500, 6);
    const later = observeTrial(tracker, state, 5000);
    expect(later.samplesPerS).toBe(0);
  });

  it('keeps a bounded history of sarcomere lengths, one per new sample', () => {
    const tracker = createTracker();
    const state = makeTrialState([makeMuscle('calf')]);
    for (let i = 0; i < HISTORY_SIZE + 10; i++) {
      pushSample(state, 'calf', { tS: i / 100, sarcomereUm: 2 + i / 1000 });
      observeTrial(tracker, state, i * 10);
    }
    observeTrial(tracker, state, 99_999);
    const history = observeTrial(tracker, state, 100_000).muscles[0]?.history ?? [];
    expect(history).toHaveLength(HISTORY_SIZE);
    expect(history.at(-1)).toBeCloseTo(2 + (HISTORY_SIZE + 9) / 1000, 9);
    expect(history[0]).toBeCloseTo(2 + 10 / 1000, 9);
  });

  it('measures how long a muscle has been silent, in wall time', () => {
    const tracker = createTracker();
    const state = walkingState();
    observeTrial(tracker, state, 1000);
    pushSample(state, 'thigh', { tS: 5.5, sarcomereUm: 3 });
    const view = observeTrial(tracker, state, 2500);
    expect(view.muscles.find((m) => m.name === 'calf')?.lastSampleAgeMs).toBe(1500);
    expect(view.muscles.find((m) => m.name === 'thigh')?.lastSampleAgeMs).toBe(0);
    expect(detectAlerts(view, {}, true).map((a) => `${a.kind}:${a.muscle}`)).toEqual(['no_samples:calf']);
  });

  it('remembers when a run of low-quality samples began and forgets it on a good one', () => {
    const tracker = createTracker();
    const state = walkingState();
    pushSample(state, 'calf', { tS: 6, sarcomereUm: 2.7, lowQuality: true, quality: 0.2 });
    observeTrial(tracker, state, 0);
    pushSample(state, 'calf', { tS: 7.2, sarcomereUm: 2.7, lowQuality: true, quality: 0.2 });
    const low = observeTrial(tracker, state, 10);
    expect(low.muscles[0]?.lowSinceS).toBe(6);
    expect(detectAlerts(low, {}, true).some((a) => a.kind === 'low_quality' && a.muscle === 'calf')).toBe(true);
    pushSample(state, 'calf', { tS: 7.3, sarcomereUm: 2.7 });
    const good = observeTrial(tracker, state, 20);
    expect(good.muscles[0]?.lowSinceS).toBeNull();
    expect(detectAlerts(good, {}, true).some((a) => a.kind === 'low_quality')).toBe(false);
  });

  it('names the commonest rejection reason and keeps only the last strides', () => {
    const state = walkingState();
    state.frames.rejected = 3;
    state.frames.rejectedByReason = { schema: 1, duplicate: 2 };
    for (let i = 0; i < STRIDES_KEPT + 3; i++) completeStride(state, 'calf', { slMinUm: 2.4, slMaxUm: 2.9 });
    const view = observeTrial(createTracker(), state, 0);
    expect(view.topReason).toEqual({ reason: 'duplicate', count: 2 });
    const calf = view.muscles[0];
    expect(calf?.strides).toHaveLength(STRIDES_KEPT);
    expect(calf?.strideCount).toBe(4 + STRIDES_KEPT + 3);
    expect(calf?.previous?.index).toBe(calf?.strideCount === undefined ? -1 : calf.strideCount - 1);
  });

  it('carries the pipeline error into the alerts, critical first', () => {
    const state = makeTrialState([makeMuscle('calf', { calibrationSource: 'baseline' })]);
    pushSample(state, 'calf', { tS: 1, sarcomereUm: 5.2 });
    const view = observeTrial(createTracker(), state, 0, 'the trial file could not be read');
    const kinds = detectAlerts(view, { connection: { state: 'reconnecting', retryInS: 3 } }, false).map((a) => a.kind);
    expect(kinds).toEqual(['stream_error', 'disconnected', 'uncalibrated', 'implausible_length']);
  });
});
