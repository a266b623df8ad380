/**
 * A settings file (`--settings FILE`: `{"format": "lengthwise-settings", "version": 1, …}`) → the
 * processing settings, every key left out taking its default (src/trial/settings.ts). Checked when it is
 * read, as the calibration and mapping files are: an unknown key is named with the nearest known one, a
 * value out of range with the range accepted, settings that contradict each other with both.
 */
import { z } from 'zod';
import { readJsonFile, schemaProblems } from './json-file.ts';
import { DEFAULT_SETTINGS, SETTING_KEYS, type Settings } from '../src/trial/settings.ts';
import { MAX_DISPERSION_SD_UM } from '../src/model/muscle-model.ts';

export type SettingsResult = { readonly ok: true; readonly settings: Settings } | { readonly ok: false; readonly problems: readonly string[] };

/** A finite number within [lo, hi] (or above lo, when `aboveLo`), with a message naming the range and unit. */
function within(lo: number, hi: number, what: string, { aboveLo = false, whole = false } = {}): z.ZodNumber {
  const range = `${aboveLo ? 'above' : 'from'} ${lo} ${aboveLo ? 'up to' : 'to'} ${hi}`;
  const message = `accepted: ${whole ? 'a whole number, ' : ''}${what} ${range}`;
  let n = z.number({ error: `must be a number; ${message}` }).finite({ error: `must be finite; ${message}` });
  n = aboveLo ? n.gt(lo, { error: `too small; ${message}` }) : n.min(lo, { error: `too small; ${message}` });
  n = n.max(hi, { error: `too large; ${message}` });
  return whole ? n.int({ error: `must be a whole number; ${message}` }) : n;
}

const settingsShape = {
  quality_gate: within(0, 1, 'a tracking quality'),
  low_quality_below: within(0, 1, 'a tracking quality'),
  gap_s: within(0, 60, 'seconds', { aboveLo: true }),
  stride_flag_gap_fraction: within(0, 1, 'a share of the stride'),
  smoothing_measurement_noise_mm2: within(0, 10_000, 'a variance in mm²', { aboveLo: true }),
  smoothing_process_noise_mm2_per_s: within(0, 1_000_000, 'a noise density in mm²/s', { aboveLo: true }),
  baseline_s: within(0, 600, 'seconds', { aboveLo: true }),
  stride_estimate_window_s: within(0, 600, 'seconds', { aboveLo: true }),
  stride_period_min_s: within(0.05, 30, 'seconds'),
  stride_period_max_s: within(0.05, 60, 'seconds'),
  plausible_sarcomere_min_um: within(0, 10, 'a sarcomere length in µm'),
  plausible_sarcomere_max_um: within(0, 10, 'a sarcomere length in µm', { aboveLo: true }),
  between_fibre_sd_um: within(0, MAX_DISPERSION_SD_UM, 'an SD in µm (0 is off; 0.21 between fibres of a human vastus lateralis)'),
  max_muscles_per_trial: within(1, 1024, 'count of muscles', { whole: true }),
  max_held_frames: within(1000, 10_000_000, 'count of frames', { whole: true }),
  clock_reset_min_s: within(0, 3600, 'seconds', { aboveLo: true }),
} satisfies Record<keyof Settings, z.ZodType>;

export const settingsSchema = z.strictObject({
  format: z.literal('lengthwise-settings', { error: 'accepted: "lengthwise-settings"' }),
  version: z.literal(1, { error: 'accepted: 1 (the only version so far)' }),
  ...Object.fromEntries(Object.entries(settingsShape).map(([key, schema]) => [key, schema.optional()])),
});

export const SETTINGS_HOW_TO =
  `accepted: {"format": "lengthwise-settings", "version": 1, KEY: VALUE, …} with any of the keys ${SETTING_KEYS.join(', ')}; ` +
  'a key left out keeps its default (`lengthwise settings` prints them all, `lengthwise settings --explain` says what each does)';

/** Settings that are each in range but contradict one another. */
function contradictions(s: Settings): string[] {
  const problems: string[] = [];
  if (!(s.stride_period_min_s < s.stride_period_max_s)) {
    problems.push(`stride_period_min_s (${s.stride_period_min_s}) must be below stride_period_max_s (${s.stride_period_max_s})`);
  }
  if (s.stride_estimate_window_s < 2 * s.stride_period_max_s) {
    problems.push(
      `stride_estimate_window_s (${s.stride_estimate_window_s}) must be at least twice stride_period_max_s (${s.stride_period_max_s}): ` +
        'the autocorrelation over the window finds periods up to half of it; lengthen the window or shorten the longest period',
    );
  }
  if (!(s.plausible_sarcomere_min_um < s.plausible_sarcomere_max_um)) {
    problems.push(`plausible_sarcomere_min_um (${s.plausible_sarcomere_min_um}) must be below plausible_sarcomere_max_um (${s.plausible_sarcomere_max_um})`);
  }
  return problems;
}

/** Validates an already-parsed JSON value as settings, over the defaults. */
export function parseSettings(value: unknown): SettingsResult {
  const parsed = settingsSchema.safeParse(value);
  if (!parsed.success) return { ok: false, problems: schemaProblems(parsed.error, SETTINGS_HOW_TO, settingsSchema, value) };
  const given = parsed.data as Partial<Record<keyof Settings, number>>;
  const settings = { ...DEFAULT_SETTINGS } as Record<keyof Settings, number>;
  for (const key of SETTING_KEYS) {
    const v = given[key];
    if (v !== undefined) settings[key] = v;
  }
  const problems = contradictions(settings);
  return problems.length > 0 ? { ok: false, problems } : { ok: true, settings };
}

/** Reads and checks a settings file; unreadable files and bad JSON are problems too, never throws. */
export function readSettingsFile(path: string): Promise<SettingsResult> {
  return readJsonFile(path, 'settings', SETTINGS_HOW_TO, parseSettings);
}
