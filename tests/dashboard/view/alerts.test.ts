import { describe, expect, it } from 'vitest';
import {
  alertLines,
  alertListRows,
  BASELINE_SHIFT_FRACTION,
  baselineShiftAlert,
  connectionAlert,
  implausibleLengthAlert,
  lowQualityAlert,
  noSamplesAlerts,
  sortAlerts,
  streamErrorAlert,
  uncalibratedAlert,
  type Alert,
} from '../../../src/dashboard/view/alerts.ts';
import { completeStride, makeMuscle, makeTrialState } from '../fixtures.ts';

function stridesWithMeans(...means: number[]) {
  const state = makeTrialState([makeMuscle('calf')]);
  for (const mean of means) completeStride(state, 'calf', { slMinUm: mean - 0.2, slMaxUm: mean + 0.2, slMeanUm: mean });
  return state.muscles.get('calf')?.strides.slice() ?? [];
}

describe('lowQualityAlert', () => {
  it('stays quiet while quality is good', () => {
    expect(lowQualityAlert('calf', null, 10)).toBeNull();
  });
  it('stays quiet for a low-quality run of one second or less', () => {
    expect(lowQualityAlert('calf', 9, 10)).toBeNull();
    expect(lowQualityAlert('calf', 9.5, 10)).toBeNull();
  });
  it('speaks after more than a second of low quality, naming the muscle and what to check', () => {
    const alert = lowQualityAlert('calf', 8.6, 10);
    expect(alert?.kind).toBe('low_quality');
    expect(alert?.muscle).toBe('calf');
    expect(alert?.text).toContain('1.4 s');
    expect(alert?.text).toContain('probe');
  });
  it('stays quiet when the time is not a number', () => {
    expect(lowQualityAlert('calf', 8, Number.NaN)).toBeNull();
  });
});

describe('implausibleLengthAlert', () => {
  it('accepts the plausible range, ends included', () => {
    for (const um of [1, 1.3, 2.7, 4.5, 5]) expect(implausibleLengthAlert('calf', um)).toBeNull();
  });
  it('raises lengths beyond either end', () => {
    expect(implausibleLengthAlert('calf', 0.99)?.text).toContain('0.99 µm, outside 1–5 µm');
    expect(implausibleLengthAlert('calf', 5.12)?.text).toContain('calibration');
  });
  it('stays quiet while the length is unknown', () => {
    expect(implausibleLengthAlert('calf', Number.NaN)).toBeNull();
    expect(implausibleLengthAlert('calf', Number.POSITIVE_INFINITY)).toBeNull();
  });
});

describe('baselineShiftAlert', () => {
  it('needs two completed strides', () => {
    expect(baselineShiftAlert('calf', stridesWithMeans())).toBeNull();
    expect(baselineShiftAlert('calf', stridesWithMeans(2.7))).toBeNull();
  });
  it('stays quiet for stride-to-stride changes within the threshold', () => {
    expect(baselineShiftAlert('calf', stridesWithMeans(2.7, 2.7 * (1 + BASELINE_SHIFT_FRACTION * 0.9)))).toBeNull();
  });
  it('raises a jump of more than 10% between consecutive strides, either way', () => {
    const up = baselineShiftAlert('calf', stridesWithMeans(2.5, 2.5, 2.8));
    expect(up?.text).toContain('up 12%');
    expect(up?.text).toContain('(stride 2→3)');
    expect(baselineShiftAlert('calf', stridesWithMeans(2.8, 2.4))?.text).toContain('down 14%');
  });
  it('stays for three strides after the jump, then clears itself', () => {
    expect(baselineShiftAlert('calf', stridesWithMeans(2.5, 2.8, 2.81))?.text).toContain('(stride 1→2)');
    expect(baselineShiftAlert('calf', stridesWithMeans(2.5, 2.8, 2.81, 2.8))?.text).toContain('(stride 1→2)');
    expect(baselineShiftAlert('calf', stridesWithMeans(2.5, 2.8, 2.81, 2.8, 2.79))).toBeNull();
  });

  it('names the newest of several jumps', () => {
    expect(baselineShiftAlert('calf', stridesWithMeans(2.5, 2.8, 2.4))?.text).toContain('down 14% (stride 2→3)');
  });
  it('ignores strides without a mean', () => {
    expect(baselineShiftAlert('calf', stridesWithMeans(Number.NaN, 2.8))).toBeNull();
    expect(baselineShiftAlert('calf', stridesWithMeans(2.8, Number.NaN))).toBeNull();
  });
});

describe('noSamplesAlerts', () => {
  it('is empty with no muscles or when every muscle flows', () => {
    expect(noSamplesAlerts(new Map(), false, undefined)).toEqual([]);
    expect(noSamplesAlerts(new Map([['calf', 100], ['thigh', 900]]), false, undefined)).toEqual([]);
  });
  it('names the one silent muscle while the others flow', () => {
    const alerts = noSamplesAlerts(new Map([['calf', 1500], ['thigh', 40]]), false, undefined);
    expect(alerts.map((a) => a.muscle)).toEqual(['calf']);
    expect(alerts[0]?.text).toContain('1.5 s');
  });
  it('says once that nothing arrives when every muscle is silent', () => {
    const alerts = noSamplesAlerts(new Map([['calf', 2500], ['thigh', 2100]]), false, { state: 'connected' });
    expect(alerts).toHaveLength(1);
    expect(alerts[0]?.muscle).toBeNull();
    expect(alerts[0]?.text).toContain('2.1 s');
  });
  it('leaves an all-silent stream to the connection alert while disconnected, and to nobody once ended', () => {
    const silent = new Map([['calf', 5000]]);
    expect(noSamplesAlerts(silent, false, { state: 'reconnecting', retryInS: 2 })).toEqual([]);
    expect(noSamplesAlerts(silent, true, undefined)).toEqual([]);
  });
});

describe('uncalibratedAlert', () => {
  it('is loud when the trial runs on the baseline assumption', () => {
    const alert = uncalibratedAlert(false, 2, true);
    expect(alert?.severity).toBe('critical');
    expect(alert?.text).toMatch(/^UNCALIBRATED/);
    expect(alert?.text).toContain('press c');
  });
  it('does not offer the c key when calibration cannot be captured', () => {
    expect(uncalibratedAlert(false, 1, false)?.text).not.toContain('press c');
  });
  it('is quiet when calibrated or before any muscle is seen', () => {
    expect(uncalibratedAlert(true, 2, true)).toBeNull();
    expect(uncalibratedAlert(false, 0, true)).toBeNull();
  });
});

describe('connectionAlert', () => {
  it('is quiet without a connection, while connected, listening or ended, and during a first attempt', () => {
    expect(connectionAlert(undefined)).toBeNull();
    for (const state of ['connected', 'listening', 'ended', 'connecting'] as const) expect(connectionAlert({ state })).toBeNull();
  });
  it('says a connection never made as NOT CONNECTED with what failed, not as a disconnection', () => {
    const alert = connectionAlert({ state: 'connecting', retryInS: 1.6, detail: 'connect ECONNREFUSED 127.0.0.1:9' });
    expect(alert?.text).toBe('NOT CONNECTED, trying again in 2 s: connect ECONNREFUSED 127.0.0.1:9');
    expect(alert?.severity).toBe('critical');
  });
  it('says when the next attempt comes while reconnecting', () => {
    expect(connectionAlert({ state: 'reconnecting', retryInS: 2.2 })?.text).toContain('reconnecting in 3 s');
    expect(connectionAlert({ state: 'reconnecting' })?.text).toContain('reconnecting soon');
    expect(connectionAlert({ state: 'reconnecting', retryInS: 1, detail: 'connection refused' })?.text).toContain('(connection refused)');
  });
});

describe('alertLines', () => {
  const refusal = connectionAlert({
    state: 'connecting',
    retryInS: 4,
    detail: 'the server refused the connection: HTTP 401 Unauthorized: Unauthorized: send "Authorization: Bearer TOKEN" or ?token=TOKEN',
  }) as Alert;

  it('keeps a short alert on one row', () => {
    expect(alertLines({ kind: 'uncalibrated', muscle: null, severity: 'critical', text: 'UNCALIBRATED' }, 80)).toEqual([' ! UNCALIBRATED ']);
  });

  it('breaks a connection alert between words onto more rows, so an 80-column screen shows the reason whole', () => {
    const lines = alertLines(refusal, 80);
    expect(lines.length).toBeGreaterThan(1);
    expect(lines.length).toBeLessThanOrEqual(3);
    for (const line of lines) expect(line.length).toBeLessThanOrEqual(80);
    expect(lines.join(' ').replace(/\s+/g, ' ').trim()).toBe(`! ${refusal.text}`);
    expect(lines[1]).toMatch(/^ {3}\S/);
  });

  it('gives an alert that may not wrap one row, however long', () => {
    expect(alertLines({ kind: 'stream_error', muscle: null, severity: 'critical', text: 'x '.repeat(100) }, 80)).toHaveLength(1);
  });

  it('counts the rows of the list: each alert\'s rows, and one for those that do not fit', () => {
    const short: Alert = { kind: 'uncalibrated', muscle: null, severity: 'critical', text: 'u' };
    const refusalRows = alertLines(refusal, 80).length;
    expect(alertListRows([refusal, short], 80, 3)).toBe(refusalRows + 1);
    expect(alertListRows([refusal, short], 200, 3)).toBe(2);
    expect(alertListRows([refusal, short, short, short], 80, 3)).toBe(refusalRows + 1 + 1);
    expect(alertListRows([], 80, 3)).toBe(0);
  });
});

describe('streamErrorAlert and sortAlerts', () => {
  it('reports a pipeline error', () => {
    expect(streamErrorAlert(null)).toBeNull();
    expect(streamErrorAlert('disk full')?.text).toContain('disk full');
  });
  it('puts critical alerts first and keeps the found order within a severity', () => {
    const a: Alert = { kind: 'low_quality', muscle: 'calf', severity: 'warning', text: 'a' };
    const b: Alert = { kind: 'no_samples', muscle: 'thigh', severity: 'critical', text: 'b' };
    const c: Alert = { kind: 'baseline_shift', muscle: 'thigh', severity: 'warning', text: 'c' };
    const d: Alert = { kind: 'uncalibrated', muscle: null, severity: 'critical', text: 'd' };
    expect(sortAlerts([a, b, c, d]).map((x) => x.text)).toEqual(['b', 'd', 'a', 'c']);
    expect(sortAlerts([])).toEqual([]);
  });
});

describe('alert texts', () => {
  it('fit an 80-column line (less the marks around them) for a short muscle name', () => {
    const texts = [
      lowQualityAlert('thigh', 1, 12.4),
      implausibleLengthAlert('thigh', 5.12),
      baselineShiftAlert('thigh', stridesWithMeans(2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.5, 2.9)),
      ...noSamplesAlerts(new Map([['thigh', 12_300], ['calf', 10]]), false, undefined),
      ...noSamplesAlerts(new Map([['thigh', 12_300]]), false, undefined),
      uncalibratedAlert(false, 2, true),
      connectionAlert({ state: 'reconnecting', retryInS: 12 }),
    ].map((a) => a?.text ?? '');
    for (const text of texts) {
      expect(text).not.toBe('');
      expect([...text].length, text).toBeLessThanOrEqual(76);
    }
  });
});
