/**
 * Every processing choice of a trial, each with its default said once here: the settings a settings file
 * (`{"format": "lengthwise-settings", "version": 1, …}`, read by adapters/settings-file.ts) sets, that
 * every command passes into the pipeline as options, and that every output's provenance records. Among
 * them the bounds a trial is held to whatever its input claims (every buffer of the pipeline is bounded
 * by one of these or by a window of time, never by the span of time a sample claims), and how a live
 * session takes a device's clock.
 */
import { DEFAULT_MAX_PERIOD_S, DEFAULT_MIN_PERIOD_S } from '../model/stride-period.ts';
import { PLAUSIBLE_SARCOMERE_UM, type SarcomereRange } from '../model/plausible-sarcomere.ts';

/**
 * Most distinct muscles one trial may carry, and one live device: a sample naming a further muscle (or a
 * header declaring more) is rejected as `too_many_muscles`. Each muscle holds some hundreds of kilobytes
 * of histograms and filters, so this bounds a trial's memory.
 */
export const MAX_MUSCLES_PER_TRIAL = 64;

/**
 * Most frames a stage may hold back while it waits to decide something (a muscle's baseline window, its
 * stride-period window). When that many wait, the stage decides from what it holds and lets them go.
 */
export const MAX_HELD_FRAMES = 200_000;

/**
 * A live connection that starts with a header and then times more than this much earlier than the
 * session has seen from that device is a device whose clock restarted: its times go on from the
 * session's timeline with an offset. A smaller step back is taken for records sent again after a
 * reconnection (rejected as duplicates or as going back in time), seconds.
 */
export const CLOCK_RESET_MIN_S = 1;

/**
 * Most markers one trial lists (time and text) in its summary; every marker is still counted
 * (frames.markers), and the summary's warnings say when some are not listed.
 */
export const MAX_MARKERS_LISTED = 10_000;

/** The processing settings, in the settings file's own key names (units at the end of each). */
export interface Settings {
  /** Samples below this tracking quality are skipped: no smoothing update, no estimate, their time is gap time. */
  readonly quality_gate: number;
  /** Samples below this tracking quality count as low quality (frames.low_quality). */
  readonly low_quality_below: number;
  /** A hole longer than this between two samples of a muscle is a gap (s). */
  readonly gap_s: number;
  /** A stride whose gap time is more than this share of its duration is flagged and left out. */
  readonly stride_flag_gap_fraction: number;
  /** Kalman measurement noise of a full-quality sample (mm²); a sample of quality q counts with this ÷ q. */
  readonly smoothing_measurement_noise_mm2: number;
  /** Kalman process noise density of the random-walk model (mm²/s). */
  readonly smoothing_process_noise_mm2_per_s: number;
  /** An uncalibrated muscle's first seconds, whose median fascicle length is taken for the plateau middle (s). */
  readonly baseline_s: number;
  /** Seconds with no foot strike of a muscle's side before its strides are estimated from its signal. */
  readonly stride_estimate_window_s: number;
  readonly stride_period_min_s: number;
  readonly stride_period_max_s: number;
  readonly plausible_sarcomere_min_um: number;
  readonly plausible_sarcomere_max_um: number;
  /** Between-fibre SD of sarcomere length for a muscle whose calibration states none (µm; 0 is off). */
  readonly between_fibre_sd_um: number;
  readonly max_muscles_per_trial: number;
  readonly max_held_frames: number;
  readonly clock_reset_min_s: number;
}

export type SettingKey = keyof Settings;

/** The defaults: what every command uses without --settings. */
export const DEFAULT_SETTINGS: Settings = Object.freeze({
  quality_gate: 0.2,
  low_quality_below: 0.5,
  gap_s: 0.25,
  stride_flag_gap_fraction: 0.1,
  smoothing_measurement_noise_mm2: 0.25,
  smoothing_process_noise_mm2_per_s: 12.5,
  baseline_s: 3,
  stride_estimate_window_s: 10,
  stride_period_min_s: DEFAULT_MIN_PERIOD_S,
  stride_period_max_s: DEFAULT_MAX_PERIOD_S,
  plausible_sarcomere_min_um: PLAUSIBLE_SARCOMERE_UM.min,
  plausible_sarcomere_max_um: PLAUSIBLE_SARCOMERE_UM.max,
  between_fibre_sd_um: 0,
  max_muscles_per_trial: MAX_MUSCLES_PER_TRIAL,
  max_held_frames: MAX_HELD_FRAMES,
  clock_reset_min_s: CLOCK_RESET_MIN_S,
});

/** What each setting does, in one line (`lengthwise settings --explain`), in the file's order. */
export const SETTING_EXPLANATIONS: Readonly<Record<SettingKey, string>> = {
  quality_gate: 'tracking quality (0–1) below which a sample is skipped: no smoothing update, no estimate, its time counts as gap time',
  low_quality_below: 'tracking quality (0–1) below which a sample counts as low quality (frames.low_quality; the filter weighs every sample by its quality)',
  gap_s: 'a hole longer than this (s) between two samples of a muscle is a gap: filters restart, nothing is interpolated, its time is gap time',
  stride_flag_gap_fraction: 'a stride whose gap time is more than this share (0–1) of its duration is flagged and left out of the trial figures and the cycle curve',
  smoothing_measurement_noise_mm2: 'Kalman measurement noise of a full-quality sample (mm², a variance); a sample of quality q counts with this ÷ q',
  smoothing_process_noise_mm2_per_s: 'Kalman process noise density of the random-walk model (mm²/s); larger follows faster and smooths less',
  baseline_s: "an uncalibrated muscle's first seconds (s), whose median fascicle length is assumed to sit at the plateau middle",
  stride_estimate_window_s: "seconds with no foot strike of a muscle's side after which its strides are estimated from its own fascicle length",
  stride_period_min_s: 'shortest stride period (s) looked for in the autocorrelation when strides are estimated',
  stride_period_max_s: 'longest stride period (s) looked for in the autocorrelation when strides are estimated',
  plausible_sarcomere_min_um: 'shortest plausible sarcomere length (µm): an estimate below it is said as a likely calibration or unit error',
  plausible_sarcomere_max_um: 'longest plausible sarcomere length (µm): an estimate above it is said as a likely calibration or unit error',
  between_fibre_sd_um: 'SD (µm) of sarcomere length between fibres for a muscle whose calibration states none; the force is averaged over that spread (0 is off)',
  max_muscles_per_trial: 'most distinct muscles one trial (and one live device) may carry; samples of further muscles are rejected as too_many_muscles',
  max_held_frames: 'most frames a stage holds while it waits to decide (a baseline window, a stride-period window); then it decides from what it holds',
  clock_reset_min_s: 'live: a device that reconnects with a header and times more than this (s) earlier than before restarted its clock and goes on with an offset',
};

/** The settings' keys in the file's order. */
export const SETTING_KEYS = Object.keys(DEFAULT_SETTINGS) as SettingKey[];

export type SettingsDocument = { format: 'lengthwise-settings'; version: 1 } & Settings;

/** Settings as a settings file writes them: the format and version, then every key in its order. */
export function settingsDocument(settings: Settings): SettingsDocument {
  const values: Record<string, number> = {};
  for (const key of SETTING_KEYS) values[key] = settings[key];
  return { format: 'lengthwise-settings', version: 1, ...(values as unknown as Settings) };
}

/** The settings' plausible sarcomere lengths, µm, as a range. */
export function plausibleSarcomereRange(settings: Settings): SarcomereRange {
  return { min: settings.plausible_sarcomere_min_um, max: settings.plausible_sarcomere_max_um };
}
