/**
 * Alerts: what the person walking beside the participant must notice at a glance. Pure functions of the
 * copied view, so each rule is tested on its own; an alert clears itself as soon as its cause is gone.
 */
import type { StrideSummary } from '../../trial/state.ts';
import type { ConnectionStatus } from '../../trial/run-status.ts';
import { fixed, percent } from '../../output/format.ts';
import { isPlausibleSarcomereUm, PLAUSIBLE_SARCOMERE_UM, type SarcomereRange } from '../../model/plausible-sarcomere.ts';

export type AlertKind =
  | 'disconnected'
  | 'uncalibrated'
  | 'no_samples'
  | 'low_quality'
  | 'implausible_length'
  | 'baseline_shift'
  | 'stream_error';

export interface Alert {
  readonly kind: AlertKind;
  /** null: about the whole trial. */
  readonly muscle: string | null;
  /** 'critical' stops the data being trustworthy; 'warning' asks for a look. */
  readonly severity: 'critical' | 'warning';
  /** What is wrong and what to do, in one line. */
  readonly text: string;
  /** Rows the text may take when it does not fit in one (the rest is cut). @default 1 */
  readonly rows?: number;
}

/** Tracking quality must stay low this long (device seconds) before it is raised. */
export const LOW_QUALITY_ALERT_S = 1;
/** A muscle without a new sample for this long (wall milliseconds) while others flow is raised. */
export const NO_SAMPLES_ALERT_MS = 1000;
/** A stride-mean length change larger than this fraction between consecutive strides suggests the probe moved. */
export const BASELINE_SHIFT_FRACTION = 0.1;

/** `lowSinceS`: device time the current run of low-quality samples began (null when quality is good). */
export function lowQualityAlert(muscle: string, lowSinceS: number | null, nowS: number): Alert | null {
  if (lowSinceS === null || !(nowS - lowSinceS > LOW_QUALITY_ALERT_S)) return null;
  return {
    kind: 'low_quality',
    muscle,
    severity: 'warning',
    text: `${muscle}: tracking quality low for ${fixed(nowS - lowSinceS, 1)} s — check probe contact, gel, strap`,
  };
}

/** A length outside the plausible range (the settings', by default PLAUSIBLE_SARCOMERE_UM), ends included as plausible. */
export function implausibleLengthAlert(muscle: string, sarcomereUm: number, plausible: SarcomereRange = PLAUSIBLE_SARCOMERE_UM): Alert | null {
  if (!Number.isFinite(sarcomereUm) || isPlausibleSarcomereUm(sarcomereUm, plausible)) return null;
  const { min, max } = plausible;
  return {
    kind: 'implausible_length',
    muscle,
    severity: 'warning',
    text: `${muscle}: SL ${fixed(sarcomereUm, 2)} µm, outside ${min}–${max} µm — check calibration, tracking`,
  };
}

/** A probe move stays on screen this many completed strides after the jump, so a glance every few seconds sees it. */
export const BASELINE_SHIFT_HOLD_STRIDES = 3;

/**
 * Compares consecutive completed strides (`strides` oldest first) among the last few. Under one
 * calibration the stride-mean sarcomere length is the stride-mean fascicle length times a constant, so
 * their relative change is the fascicle's. The newest jump is named.
 */
export function baselineShiftAlert(muscle: string, strides: readonly StrideSummary[]): Alert | null {
  for (let i = strides.length - 1; i >= 1 && i >= strides.length - BASELINE_SHIFT_HOLD_STRIDES; i--) {
    const last = strides[i];
    const before = strides[i - 1];
    if (last === undefined || before === undefined) continue;
    if (!(before.slMeanUm > 0) || !Number.isFinite(last.slMeanUm)) continue;
    const change = (last.slMeanUm - before.slMeanUm) / before.slMeanUm;
    if (!(Math.abs(change) > BASELINE_SHIFT_FRACTION)) continue;
    return {
      kind: 'baseline_shift',
      muscle,
      severity: 'warning',
      text: `${muscle}: mean length ${change > 0 ? 'up' : 'down'} ${percent(Math.abs(change))} (stride ${before.index + 1}→${last.index + 1}): probe moved? check, recalibrate`,
    };
  }
  return null;
}

/**
 * `lastSampleAgeMs`: wall milliseconds since each muscle's newest sample. A muscle is raised when it is
 * silent while another still flows; when every muscle is silent (and the trial has not ended) one alert
 * says so, unless the connection alert already explains it.
 */
export function noSamplesAlerts(
  lastSampleAgeMs: ReadonlyMap<string, number>,
  ended: boolean,
  connection: ConnectionStatus | undefined,
): Alert[] {
  if (ended || lastSampleAgeMs.size === 0) return [];
  const silent = [...lastSampleAgeMs].filter(([, ageMs]) => ageMs > NO_SAMPLES_ALERT_MS);
  if (silent.length === 0) return [];
  if (silent.length < lastSampleAgeMs.size) {
    return silent.map(([muscle, ageMs]) => ({
      kind: 'no_samples' as const,
      muscle,
      severity: 'critical' as const,
      text: `${muscle}: no samples for ${fixed(ageMs / 1000, 1)} s while others arrive — check this probe`,
    }));
  }
  if (connection !== undefined && connection.state !== 'connected') return [];
  const shortestMs = Math.min(...silent.map(([, ageMs]) => ageMs));
  return [
    {
      kind: 'no_samples',
      muscle: null,
      severity: 'critical',
      text: `no samples from any muscle for ${fixed(shortestMs / 1000, 1)} s — check the device and its stream`,
    },
  ];
}

export function uncalibratedAlert(calibrated: boolean, muscleCount: number, canCalibrate: boolean): Alert | null {
  if (calibrated || muscleCount === 0) return null;
  const how = canCalibrate ? 'give --calibration or press c' : 'give --calibration FILE';
  return {
    kind: 'uncalibrated',
    muscle: null,
    severity: 'critical',
    text: `UNCALIBRATED (first 3 s taken as mid-plateau): ${how}`,
  };
}

/**
 * A lost connection, or one never made: what failed comes in full (a server's refusal says why), so
 * this alert may take a second row.
 */
export function connectionAlert(connection: ConnectionStatus | undefined): Alert | null {
  if (connection === undefined) return null;
  const when = connection.retryInS === undefined ? 'soon' : `in ${Math.max(0, Math.ceil(connection.retryInS))} s`;
  if (connection.state === 'connecting') {
    if (connection.retryInS === undefined) return null;
    return {
      kind: 'disconnected',
      muscle: null,
      severity: 'critical',
      text: `NOT CONNECTED, trying again ${when}: ${connection.detail ?? 'the connection failed'}`,
      rows: 3,
    };
  }
  if (connection.state !== 'reconnecting') return null;
  const detail = connection.detail === undefined ? '' : ` (${connection.detail})`;
  return {
    kind: 'disconnected',
    muscle: null,
    severity: 'critical',
    text: `DISCONNECTED — reconnecting ${when}; the gap is not filled in${detail}`,
    rows: 3,
  };
}

export function streamErrorAlert(error: string | null): Alert | null {
  if (error === null) return null;
  return { kind: 'stream_error', muscle: null, severity: 'critical', text: `the pipeline stopped: ${error}` };
}

const SEVERITY_ORDER: Readonly<Record<Alert['severity'], number>> = { critical: 0, warning: 1 };

/** Critical first, then in the order found (trial-wide before per muscle). */
export function sortAlerts(alerts: readonly Alert[]): Alert[] {
  return alerts
    .map((alert, order) => ({ alert, order }))
    .sort((a, b) => SEVERITY_ORDER[a.alert.severity] - SEVERITY_ORDER[b.alert.severity] || a.order - b.order)
    .map(({ alert }) => alert);
}

/** True when both lists say the same alerts in the same order (kind, muscle, severity and text). */
export function sameAlerts(a: readonly Alert[], b: readonly Alert[]): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    const y = b[i];
    if (x === undefined || y === undefined) return false;
    if (x.kind !== y.kind || x.muscle !== y.muscle || x.severity !== y.severity || x.text !== y.text || x.rows !== y.rows) return false;
  }
  return true;
}

/**
 * The rows an alert is drawn on, `columns` wide: ` ! TEXT `, broken between words onto at most
 * `alert.rows` rows (continuation rows indented under the text); what does not fit is cut by the screen.
 */
export function alertLines(alert: Alert, columns: number): string[] {
  const whole = ` ! ${alert.text} `;
  const rows = alert.rows ?? 1;
  if (rows <= 1 || whole.length <= columns) return [whole];
  const lines: string[] = [];
  let rest = whole;
  while (lines.length < rows - 1 && rest.length > columns) {
    const room = rest.slice(0, columns);
    const cut = room.lastIndexOf(' ', columns);
    const at = cut > columns / 2 ? cut : columns;
    lines.push(rest.slice(0, at));
    rest = `   ${rest.slice(at).trimStart()}`;
  }
  lines.push(rest);
  return lines;
}

/** Rows the alert list takes: each shown alert's rows, and one row saying how many more when they do not all fit. */
export function alertListRows(alerts: readonly Alert[], columns: number, maxAlerts: number): number {
  const overflow = alerts.length > maxAlerts;
  const shown = overflow ? alerts.slice(0, maxAlerts - 1) : alerts;
  return shown.reduce((n, a) => n + alertLines(a, columns).length, 0) + (overflow ? 1 : 0);
}
