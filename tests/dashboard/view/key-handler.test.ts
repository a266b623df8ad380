import { describe, expect, it } from 'vitest';
import { handleKey, INITIAL_UI, keyOfChar, type KeyContext, type KeyInfo, type UiState } from '../../../src/dashboard/view/key-handler.ts';

const NO_KEY: KeyInfo = {
  ctrl: false,
  shift: false,
  tab: false,
  return: false,
  escape: false,
  backspace: false,
  delete: false,
  leftArrow: false,
  rightArrow: false,
  upArrow: false,
  downArrow: false,
};
const CTX: KeyContext = {
  muscles: ['calf', 'thigh'],
  elapsedS: 61.25,
  now: () => new Date(2026, 4, 6, 9, 8, 7),
  canMark: true,
  canCalibrate: true,
  canChangeSpeed: true,
};

/** Types a sequence: strings are characters, objects are special keys. */
function type(keys: readonly (string | Partial<KeyInfo>)[], ctx: KeyContext = CTX, from: UiState = INITIAL_UI) {
  let ui = from;
  const effects = [];
  for (const k of keys) {
    const step = typeof k === 'string' ? handleKey(ui, k, NO_KEY, ctx) : handleKey(ui, '', { ...NO_KEY, ...k }, ctx);
    ui = step.ui;
    effects.push(...step.effects);
  }
  return { ui, effects };
}

describe('handleKey', () => {
  it('does nothing for a key it does not know', () => {
    expect(type(['x', 'Z', '7'])).toEqual({ ui: INITIAL_UI, effects: [] });
  });

  it('quits on q and on Ctrl+C', () => {
    expect(type(['q']).effects).toEqual([{ kind: 'quit' }]);
    expect(handleKey(INITIAL_UI, 'c', { ...NO_KEY, ctrl: true }, CTX).effects).toEqual([{ kind: 'quit' }]);
  });

  it('toggles the freeze on space', () => {
    expect(type([' ']).ui.frozen).toBe(true);
    expect(type([' ', ' ']).ui.frozen).toBe(false);
  });

  it('numbers markers and stamps them with trial time and the time of day', () => {
    const { effects, ui } = type(['m', 'm']);
    expect(ui.markerCount).toBe(2);
    expect(effects.filter((e) => e.kind === 'marker')).toEqual([
      { kind: 'marker', text: 'marker 1 at trial time 1:01.2 (09:08:07)' },
      { kind: 'marker', text: 'marker 2 at trial time 1:01.2 (09:08:07)' },
    ]);
  });

  it('says so when markers, calibration or speed are not offered', () => {
    const bare = { ...CTX, canMark: false, canCalibrate: false, canChangeSpeed: false };
    expect(type(['m'], bare).effects).toEqual([{ kind: 'say', text: 'markers cannot be placed here' }]);
    expect(type(['c'], bare).effects).toEqual([{ kind: 'say', text: 'calibration cannot be captured here' }]);
    expect(type(['+', '-'], bare).effects).toEqual([]);
  });

  it('cycles the focus forward with tab and right, back with shift+tab and left, and wraps', () => {
    expect(type([{ tab: true }]).ui.focus).toBe(1);
    expect(type([{ tab: true }, { rightArrow: true }]).ui.focus).toBe(0);
    expect(type([{ leftArrow: true }]).ui.focus).toBe(1);
    expect(type([{ tab: true, shift: true }]).ui.focus).toBe(1);
    expect(type([{ tab: true }], { ...CTX, muscles: [] }).ui.focus).toBe(0);
  });

  it('calibrates the focused muscle at 2.7 µm when nothing is typed', () => {
    const { effects, ui } = type([{ tab: true }, 'c', { return: true }]);
    expect(effects[0]).toEqual({ kind: 'calibrate', muscle: 'thigh', sarcomereUm: 2.7 });
    expect(ui.mode.kind).toBe('normal');
  });

  it('reads a typed length with a comma or a point, and backspace', () => {
    expect(type(['c', '2', ',', '5', '9', { backspace: true }, '5', { return: true }]).effects[0]).toEqual({
      kind: 'calibrate',
      muscle: 'calf',
      sarcomereUm: 2.55,
    });
    expect(type(['c', '3.1', { return: true }]).effects[0]).toEqual({ kind: 'calibrate', muscle: 'calf', sarcomereUm: 3.1 });
  });

  it('keeps asking after a bad length, ignores other keys meanwhile, and cancels on Esc', () => {
    const bad = type(['c', '1', '2', { return: true }]);
    expect(bad.effects).toEqual([]);
    expect(bad.ui.mode).toMatchObject({ kind: 'calibrate', problem: expect.stringContaining('from 1 to 5') as unknown });
    const ignored = type(['q', 'm', ' ', 'x'], CTX, bad.ui);
    expect(ignored.effects).toEqual([]);
    expect(ignored.ui.frozen).toBe(false);
    const cancelled = type([{ escape: true }], CTX, bad.ui);
    expect(cancelled.ui.mode.kind).toBe('normal');
    expect(cancelled.effects).toEqual([{ kind: 'say', text: 'calibration cancelled' }]);
  });

  it('asks for a muscle before calibrating when none has been seen', () => {
    expect(type(['c'], { ...CTX, muscles: [] }).effects).toEqual([{ kind: 'say', text: 'no muscle to calibrate yet' }]);
  });

  it('opens help on ?, swallows other keys there but q, and closes on ? or Esc', () => {
    const help = type(['?']).ui;
    expect(help.mode.kind).toBe('help');
    expect(type(['m', ' '], CTX, help)).toEqual({ ui: help, effects: [] });
    expect(type(['q'], CTX, help).effects).toEqual([{ kind: 'quit' }]);
    expect(type(['?'], CTX, help).ui.mode.kind).toBe('normal');
    expect(type([{ escape: true }], CTX, help).ui.mode.kind).toBe('normal');
  });

  it('changes the speed on + or = and - or _', () => {
    expect(type(['+', '=', '-', '_']).effects).toEqual([
      { kind: 'speed', direction: 1 },
      { kind: 'speed', direction: 1 },
      { kind: 'speed', direction: -1 },
      { kind: 'speed', direction: -1 },
    ]);
  });
});

describe('keyOfChar', () => {
  it('turns the control characters of a typed run into their keys and leaves others as input', () => {
    expect(keyOfChar('\r')[1].return).toBe(true);
    expect(keyOfChar('\t')[1].tab).toBe(true);
    expect(keyOfChar('\u007F')[1].backspace).toBe(true);
    expect(keyOfChar('7')).toEqual(['7', expect.objectContaining({ return: false, tab: false }) as unknown]);
  });
});
