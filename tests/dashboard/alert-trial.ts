/**
 * An invented trial, made here for the dashboard's terminal test, with the troubles its alerts are for:
 * a stretch of low tracking quality, a probe that goes silent while the other keeps sending, and a probe
 * that moves (the fascicle baseline jumps at a foot strike). A smooth made-up gait, not recorded data.
 *
 * The trial has no fixed length: `alertTrialRecords` gives the records of any span of it, so a test can
 * send it piece by piece, in step with what it checks. When the thigh probe comes back and when the calf
 * probe moves are the plan's, which the test may decide as the trial goes.
 */

export const ALERT_TRIAL = {
  rateHz: 100,
  /** Samples per stride: a left foot strike every 1.1 s, a right one half a stride later. */
  strideSamples: 110,
  /** calf: quality 0.35 (weighed down, still estimated) over this span. */
  lowQualityS: [5, 8] as const,
  /** thigh: no samples from here on, until the plan brings it back. */
  silentFromS: 10,
  /** calf: fascicle length × this from the plan's foot strike on. */
  shiftFactor: 1.15,
  calfSarcomeres: 17_500,
  thighSarcomeres: 30_000,
} as const;

/** The stride, seconds. */
export const STRIDE_S = ALERT_TRIAL.strideSamples / ALERT_TRIAL.rateHz;

export interface AlertTrialPlan {
  /** thigh sends again from this time on (Infinity: not yet). */
  readonly thighBackS: number;
  /** calf's fascicle length is shifted from this time on, a left foot strike (Infinity: not yet). */
  readonly shiftAtS: number;
}

/** Neither the thigh probe's return nor the calf probe's move decided yet. */
export const OPEN_PLAN: AlertTrialPlan = { thighBackS: Number.POSITIVE_INFINITY, shiftAtS: Number.POSITIVE_INFINITY };

/** The trial's header: its muscles, their sides and their calibration. */
export function alertTrialHeader(): string {
  const t = ALERT_TRIAL;
  return JSON.stringify({
    format: 'lengthwise-stream',
    version: 1,
    subject: 'SIM-ALERTS',
    trial: 'alerts-1',
    rate_hz: t.rateHz,
    muscles: { calf: { side: 'left' }, thigh: { side: 'right' } },
    calibration: {
      muscles: {
        calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: t.calfSarcomeres },
        thigh: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: t.thighSarcomeres },
      },
    },
  });
}

/** The first left foot strike at or after `tS`. */
export function leftFootStrikeFrom(tS: number): number {
  const stride = ALERT_TRIAL.strideSamples;
  return (Math.ceil(Math.round(tS * ALERT_TRIAL.rateHz) / stride) * stride) / ALERT_TRIAL.rateHz;
}

/** The records (foot strikes and samples, one JSON text each) with `fromS` ≤ t < `toS`, in time order. */
export function alertTrialRecords(plan: AlertTrialPlan, fromS: number, toS: number): string[] {
  const t = ALERT_TRIAL;
  const round = (x: number, digits: number): number => Number(x.toFixed(digits));
  const lines: string[] = [];
  // Sample i is at i / rate seconds: whole sample numbers, so spans sent one after another meet exactly.
  for (let i = Math.round(fromS * t.rateHz); i < Math.round(toS * t.rateHz); i++) {
    const tS = round(i / t.rateHz, 2);
    if (i % t.strideSamples === 0) lines.push(JSON.stringify({ t: tS, event: 'foot_strike', side: 'left' }));
    const half = t.strideSamples / 2;
    if (i >= half && (i - half) % t.strideSamples === 0) lines.push(JSON.stringify({ t: tS, event: 'foot_strike', side: 'right' }));
    const phase = (2 * Math.PI * i) / t.strideSamples;
    const calfSl = 2.6 + 0.28 * Math.sin(phase);
    const shift = tS >= plan.shiftAtS ? t.shiftFactor : 1;
    const low = tS >= t.lowQualityS[0] && tS < t.lowQualityS[1];
    lines.push(
      JSON.stringify({
        t: tS,
        muscle: 'calf',
        fascicle_mm: round((calfSl * t.calfSarcomeres * shift) / 1000, 3),
        pennation_deg: round(22 - 3 * Math.sin(phase), 2),
        quality: low ? 0.35 : 0.95,
      }),
    );
    if (tS < t.silentFromS || tS >= plan.thighBackS) {
      const thighSl = 2.85 + 0.3 * Math.sin(phase + Math.PI / 2);
      lines.push(
        JSON.stringify({
          t: tS,
          muscle: 'thigh',
          fascicle_mm: round((thighSl * t.thighSarcomeres) / 1000, 3),
          pennation_deg: round(16 + 2 * Math.cos(phase), 2),
          quality: 0.93,
        }),
      );
    }
  }
  return lines;
}
