/**
 * What a key does, as a pure step: the screen's own state in, the next state and the effects out (the
 * component runs the callbacks). Pure, so keys typed faster than a frame each see the state the one
 * before left.
 */
import type { Key } from 'ink';
import { PLAUSIBLE_SARCOMERE_UM, type SarcomereRange } from '../../model/plausible-sarcomere.ts';
import { clockTime, elapsed, fixed } from '../../output/format.ts';
import { DEFAULT_CALIBRATION_UM } from './keys.ts';

export type Mode =
  | { readonly kind: 'normal' }
  | { readonly kind: 'help' }
  | { readonly kind: 'calibrate'; readonly muscle: string; readonly typed: string; readonly problem: string | null };

export interface UiState {
  readonly mode: Mode;
  readonly frozen: boolean;
  readonly focus: number;
  readonly markerCount: number;
}

export const INITIAL_UI: UiState = { mode: { kind: 'normal' }, frozen: false, focus: 0, markerCount: 0 };

export type Effect =
  | { readonly kind: 'quit' }
  | { readonly kind: 'marker'; readonly text: string }
  | { readonly kind: 'calibrate'; readonly muscle: string; readonly sarcomereUm: number }
  | { readonly kind: 'speed'; readonly direction: 1 | -1 }
  | { readonly kind: 'say'; readonly text: string };

export interface KeyContext {
  readonly muscles: readonly string[];
  /** Trial time for marker texts (lastTS − firstTS). */
  readonly elapsedS: number;
  readonly now: () => Date;
  readonly canMark: boolean;
  readonly canCalibrate: boolean;
  readonly canChangeSpeed: boolean;
  /** The lengths a typed calibration length may take (µm). @default PLAUSIBLE_SARCOMERE_UM */
  readonly plausibleUm?: SarcomereRange | undefined;
}

export type KeyInfo = Pick<Key, 'ctrl' | 'shift' | 'tab' | 'return' | 'escape' | 'backspace' | 'delete' | 'leftArrow' | 'rightArrow' | 'upArrow' | 'downArrow'>;

export function handleKey(ui: UiState, input: string, key: KeyInfo, ctx: KeyContext): { readonly ui: UiState; readonly effects: readonly Effect[] } {
  const count = ctx.muscles.length;
  const focus = count === 0 ? 0 : Math.min(ui.focus, count - 1);
  const mode = ui.mode;
  if (mode.kind === 'calibrate') {
    if (key.escape) return { ui: { ...ui, mode: { kind: 'normal' } }, effects: [{ kind: 'say', text: 'calibration cancelled' }] };
    if (key.return) {
      const parsed = parseCalibrationUm(mode.typed, DEFAULT_CALIBRATION_UM, ctx.plausibleUm ?? PLAUSIBLE_SARCOMERE_UM);
      if (!parsed.ok) return { ui: { ...ui, mode: { ...mode, problem: parsed.problem } }, effects: [] };
      return {
        ui: { ...ui, mode: { kind: 'normal' } },
        effects: [
          { kind: 'calibrate', muscle: mode.muscle, sarcomereUm: parsed.um },
          { kind: 'say', text: `calibration of ${mode.muscle} at ${fixed(parsed.um, 2)} µm asked for` },
        ],
      };
    }
    if (key.backspace || key.delete) return { ui: { ...ui, mode: { ...mode, typed: mode.typed.slice(0, -1), problem: null } }, effects: [] };
    if (/^[0-9.,]+$/.test(input)) {
      const typed = (mode.typed + input.replaceAll(',', '.')).slice(0, 8);
      return { ui: { ...ui, mode: { ...mode, typed, problem: null } }, effects: [] };
    }
    return { ui, effects: [] };
  }
  if (input === 'q' || (key.ctrl && input === 'c')) return { ui, effects: [{ kind: 'quit' }] };
  if (mode.kind === 'help') {
    return input === '?' || key.escape ? { ui: { ...ui, mode: { kind: 'normal' } }, effects: [] } : { ui, effects: [] };
  }
  if (input === '?') return { ui: { ...ui, mode: { kind: 'help' } }, effects: [] };
  if (input === ' ') return { ui: { ...ui, frozen: !ui.frozen }, effects: [] };
  if (input === 'm') {
    if (!ctx.canMark) return { ui, effects: [{ kind: 'say', text: 'markers cannot be placed here' }] };
    const n = ui.markerCount + 1;
    return {
      ui: { ...ui, markerCount: n },
      effects: [
        { kind: 'marker', text: `marker ${n} at trial time ${elapsed(ctx.elapsedS)} (${clockTime(ctx.now())})` },
        { kind: 'say', text: `marker ${n} placed` },
      ],
    };
  }
  if (input === 'c') {
    if (!ctx.canCalibrate) return { ui, effects: [{ kind: 'say', text: 'calibration cannot be captured here' }] };
    const muscle = ctx.muscles[focus];
    if (muscle === undefined) return { ui, effects: [{ kind: 'say', text: 'no muscle to calibrate yet' }] };
    return { ui: { ...ui, mode: { kind: 'calibrate', muscle, typed: '', problem: null } }, effects: [] };
  }
  if (count > 0 && (key.tab || key.rightArrow || key.downArrow || key.leftArrow || key.upArrow)) {
    const back = key.leftArrow || key.upArrow || (key.tab && key.shift);
    return { ui: { ...ui, focus: (focus + (back ? -1 : 1) + count) % count }, effects: [] };
  }
  if (ctx.canChangeSpeed && (input === '+' || input === '=')) return { ui, effects: [{ kind: 'speed', direction: 1 }] };
  if (ctx.canChangeSpeed && (input === '-' || input === '_')) return { ui, effects: [{ kind: 'speed', direction: -1 }] };
  return { ui, effects: [] };
}

export const NO_KEY: Key = {
  upArrow: false,
  downArrow: false,
  leftArrow: false,
  rightArrow: false,
  pageDown: false,
  pageUp: false,
  home: false,
  end: false,
  return: false,
  escape: false,
  ctrl: false,
  shift: false,
  tab: false,
  backspace: false,
  delete: false,
  meta: false,
  super: false,
  hyper: false,
  capsLock: false,
  numLock: false,
};

/** One character of a run of typed keys, as Ink would have given it alone. */
export function keyOfChar(char: string): [string, Key] {
  switch (char) {
    case '\r':
    case '\n':
      return ['', { ...NO_KEY, return: true }];
    case '\t':
      return ['', { ...NO_KEY, tab: true }];
    case '\u007F':
    case '\b':
      return ['', { ...NO_KEY, backspace: true }];
    default:
      return [char, NO_KEY];
  }
}

/** Reads the typed length: a number of µm in the plausible range, or a message saying what is accepted. */
export function parseCalibrationUm(
  typed: string,
  defaultUm: number,
  range: { readonly min: number; readonly max: number },
): { readonly ok: true; readonly um: number } | { readonly ok: false; readonly problem: string } {
  const text = typed.trim();
  if (text === '') return { ok: true, um: defaultUm };
  const um = Number(text);
  if (!Number.isFinite(um) || um < range.min || um > range.max) {
    return {
      ok: false,
      problem: `"${text}" is not a usable sarcomere length: type a number of µm from ${range.min} to ${range.max} (e.g. 2.7), or Esc to cancel`,
    };
  }
  return { ok: true, um };
}
