/** How a study run is going, as one line: a bar on a terminal, or plain words for a log. */
import type { StudyProgress } from './run-study.ts';

/** A count of samples per second in a few characters (12.3 k/s, 1.45 M/s). */
export function rateText(samplesPerS: number): string {
  if (!Number.isFinite(samplesPerS) || samplesPerS <= 0) return '— samples/s';
  if (samplesPerS >= 1e6) return `${(samplesPerS / 1e6).toFixed(2)} M samples/s`;
  if (samplesPerS >= 1e3) return `${(samplesPerS / 1e3).toFixed(1)} k samples/s`;
  return `${samplesPerS.toFixed(0)} samples/s`;
}

/** Seconds as m:ss (or h:mm:ss). */
export function durationText(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '—';
  const s = Math.round(seconds);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const ss = String(s % 60).padStart(2, '0');
  return h > 0 ? `${h}:${String(m).padStart(2, '0')}:${ss}` : `${m}:${ss}`;
}

/** Seconds left, from the bytes still to read at the rate so far; NaN until something has been read. */
export function secondsLeft(p: StudyProgress, elapsedS: number): number {
  if (p.trialsDone === p.trialsTotal) return 0;
  if (p.bytesDone <= 0 || elapsedS <= 0) return Number.NaN;
  return (elapsedS * (p.bytesTotal - p.bytesDone)) / p.bytesDone;
}

/** The figures after the bar: trials done, failures, trials with warnings (`warned`), samples per second, time left. */
export function progressFigures(p: StudyProgress, elapsedS: number, warned = 0): string {
  const failed = p.trialsFailed > 0 ? `, ${p.trialsFailed} failed` : '';
  const warnings = warned > 0 ? `, ${warned} with warnings` : '';
  return `${p.trialsDone}/${p.trialsTotal} trials${failed}${warnings} · ${rateText(p.samples / elapsedS)} · ${durationText(secondsLeft(p, elapsedS))} left`;
}

/** A bar that fills with the bytes read, then the figures; at most `columns` characters wide. */
export function progressBar(p: StudyProgress, elapsedS: number, columns: number, warned = 0): string {
  const figures = progressFigures(p, elapsedS, warned);
  const barWidth = Math.max(0, Math.min(40, columns - figures.length - 3));
  const fraction = p.bytesTotal > 0 ? p.bytesDone / p.bytesTotal : p.trialsDone / Math.max(1, p.trialsTotal);
  const filled = Math.round(Math.max(0, Math.min(1, fraction)) * barWidth);
  const bar = barWidth > 0 ? `${'█'.repeat(filled)}${'░'.repeat(barWidth - filled)} ` : '';
  return `${bar}${figures}`.slice(0, Math.max(0, columns - 1));
}
