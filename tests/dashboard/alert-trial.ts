/**
 * An invented trial, made here for the dashboard's terminal test, with the troubles its alerts are for:
 * a stretch of low tracking quality, a probe that goes silent while the other keeps sending, and a probe
 * that moves (the fascicle baseline jumps at a foot strike). A smooth made-up gait, not recorded data.
 */
import { writeFileSync } from 'node:fs';

export const ALERT_TRIAL = {
  durationS: 24,
  strideS: 1.1,
  /** calf: quality 0.35 (weighed down, still estimated) over this span. */
  lowQualityS: [5, 8] as const,
  /** thigh: no samples at all over this span. */
  silentS: [10, 13.2] as const,
  /** calf: fascicle length × 1.15 from this foot strike on (15 × 1.1 s). */
  shiftAtS: 16.5,
  shiftFactor: 1.15,
  calfSarcomeres: 17_500,
  thighSarcomeres: 30_000,
} as const;

export function alertTrialLines(): string[] {
  const t = ALERT_TRIAL;
  const lines: string[] = [
    JSON.stringify({
      format: 'lengthwise-stream',
      version: 1,
      subject: 'SIM-ALERTS',
      trial: 'alerts-1',
      rate_hz: 100,
      muscles: { calf: { side: 'left' }, thigh: { side: 'right' } },
      calibration: {
        muscles: {
          calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: t.calfSarcomeres },
          thigh: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: t.thighSarcomeres },
        },
      },
    }),
  ];
  const round = (x: number, digits: number): number => Number(x.toFixed(digits));
  for (let i = 0; i <= t.durationS * 100; i++) {
    const tS = round(i / 100, 2);
    // Foot strikes: left at multiples of the stride, right half a stride later.
    const left = tS / t.strideS;
    if (Math.abs(left - Math.round(left)) < 1e-9) lines.push(JSON.stringify({ t: tS, event: 'foot_strike', side: 'left' }));
    const right = (tS - t.strideS / 2) / t.strideS;
    if (tS >= t.strideS / 2 && Math.abs(right - Math.round(right)) < 1e-9) lines.push(JSON.stringify({ t: tS, event: 'foot_strike', side: 'right' }));
    const phase = (2 * Math.PI * tS) / t.strideS;
    const calfSl = 2.6 + 0.28 * Math.sin(phase);
    const shift = tS >= t.shiftAtS ? t.shiftFactor : 1;
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
    if (tS < t.silentS[0] || tS >= t.silentS[1]) {
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

export function writeAlertTrial(path: string): void {
  writeFileSync(path, `${alertTrialLines().join('\n')}\n`);
}
