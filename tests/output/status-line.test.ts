import { describe, expect, it } from 'vitest';
import { statusLine } from '../../src/output/status-line.ts';
import { makeMuscle, makeTrialState, pushSample, walkingState } from '../dashboard/fixtures.ts';
import { expectToContainEach } from '../helpers/text-checks.ts';

describe('statusLine', () => {
  it('says what little is known of an empty trial', () => {
    const line = statusLine(makeTrialState([], 'replays/empty.ndjson'));
    expectToContainEach(line, ['replays/empty.ndjson', '0 samples', 't –']);
  });

  it('gives the source, elapsed time, counts, calibration and each muscle with units', () => {
    const line = statusLine(walkingState());
    expectToContainEach(line, ['replays/fixture-walk.ndjson', 't 0:05.0', '2 samples', 'calibrated', 'calf left 2.71 µm plateau', 'thigh right 3.05 µm descending']);
    expect(line).not.toContain('\n');
    // eslint-disable-next-line no-control-regex -- the escape character is what must be absent
    expect(line).not.toMatch(/\u001B/);
  });

  it('claims neither calibrated nor UNCALIBRATED before a muscle\'s calibration is known', () => {
    const empty = statusLine(makeTrialState([]));
    const waiting = statusLine(makeTrialState([makeMuscle('calf', { calibrationSource: null })]));
    for (const line of [empty, waiting]) {
      expect(line).toContain('calibration pending');
      expect(line).not.toMatch(/\| (calibrated|UNCALIBRATED)/);
    }
  });

  it('is loud when uncalibrated and names the commonest rejection', () => {
    const state = makeTrialState([makeMuscle('calf', { calibrationSource: 'baseline' })]);
    pushSample(state, 'calf', { tS: 1, sarcomereUm: 2.6 });
    state.frames.rejected = 5;
    state.frames.rejectedByReason = { not_json: 1, out_of_range: 4 };
    const line = statusLine(state);
    expect(line).toContain('UNCALIBRATED');
    expect(line).toContain('5 rejected (most out_of_range)');
  });

  it('adds the status: source label, connection, replay progress and log path', () => {
    const line = statusLine(walkingState(), {
      sourceLabel: 'ws://127.0.0.1:8750',
      connection: { state: 'reconnecting', retryInS: 1.2 },
      replay: { progress: 0.456, speed: 4 },
      logPath: 'sessions/s1.log',
    });
    expect(line).toMatch(/^ws:\/\/127\.0\.0\.1:8750/);
    expectToContainEach(line, ['DISCONNECTED, reconnecting in 2 s', 'replay 46% at 4×', 'log sessions/s1.log']);
  });

  it('writes a dash for a muscle whose length is not known yet', () => {
    const state = makeTrialState([makeMuscle('calf', { side: null })]);
    expect(statusLine(state)).toContain('calf – µm');
  });
});
