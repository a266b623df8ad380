import { describe, expect, it } from 'vitest';
import { EMPTY } from 'rxjs';
import { implausibleLengthAlert } from '../../../src/dashboard/view/alerts.ts';
import { handleKey, INITIAL_UI, keyOfChar, type KeyContext, type UiState } from '../../../src/dashboard/view/key-handler.ts';
import { captureCalibration } from '../../../src/run/capture-calibration.ts';
import { runTrial } from '../../../src/run/run-trial.ts';
import { DEFAULT_SETTINGS } from '../../../src/trial/settings.ts';

// A study may narrow the plausible range (settings plausible_sarcomere_min_um / _max_um); the screen raises
// and accepts what the settings say, as the pipeline's notice does. The default 1–5 µm is the project's own
// (skeletal muscle's filament lengths make longer or shorter lengths impossible; common practice, no source).
const NARROW = { min: 1.5, max: 4.5 };

function typed(text: string, ctx: KeyContext): { ui: UiState; said: string[] } {
  let ui = INITIAL_UI;
  const said: string[] = [];
  for (const ch of text) {
    const [input, key] = keyOfChar(ch);
    const step = handleKey(ui, input, key, ctx);
    ui = step.ui;
    for (const e of step.effects) if (e.kind === 'calibrate') said.push(`${e.muscle} ${e.sarcomereUm}`);
  }
  return { ui, said };
}

const CTX: KeyContext = { muscles: ['calf'], elapsedS: 0, now: () => new Date(0), canMark: true, canCalibrate: true, canChangeSpeed: true };

describe('the plausible range of the settings on the screen', () => {
  it('raises a length outside the settings range that the default range accepts', () => {
    expect(implausibleLengthAlert('calf', 4.8)).toBeNull();
    expect(implausibleLengthAlert('calf', 4.8, NARROW)?.text).toContain('4.80 µm, outside 1.5–4.5 µm');
    expect(implausibleLengthAlert('calf', 4.5, NARROW)).toBeNull();
  });

  it('refuses a typed calibration length outside the settings range, saying the range', () => {
    expect(typed('c4.8\r', CTX).said).toEqual(['calf 4.8']);
    const narrow = typed('c4.8\r', { ...CTX, plausibleUm: NARROW });
    expect(narrow.said).toEqual([]);
    expect(narrow.ui.mode).toMatchObject({ kind: 'calibrate', problem: expect.stringContaining('from 1.5 to 4.5') });
  });

  it('refuses a captured calibration outside the settings range', () => {
    const lengths = Array.from({ length: 100 }, () => 54);
    expect(captureCalibration('calf', 'human', lengths, 4.8).ok).toBe(true);
    expect(captureCalibration('calf', 'human', lengths, 4.8, {}, NARROW)).toMatchObject({ ok: false, message: expect.stringContaining('between 1.5 and 4.5 µm') });
  });

  it('is the range a trial runs with', () => {
    const settings = { ...DEFAULT_SETTINGS, plausible_sarcomere_min_um: 1.5, plausible_sarcomere_max_um: 4.5 };
    const trial = runTrial(EMPTY, { source: 'none', settings });
    expect(trial.plausibleUm).toEqual(NARROW);
    expect(runTrial(EMPTY, { source: 'none' }).plausibleUm).toEqual({ min: 1, max: 5 });
  });
});
