/** The `--strides FILE.csv` table: one row per stride and muscle, units in the column names (RFC 4180). */
import { REGION_KEYS } from '../model/regions.ts';
import type { TrialState } from '../state.ts';

export const STRIDE_COLUMNS = [
  'muscle',
  'side',
  'stride',
  'start_s',
  'end_s',
  'duration_s',
  'sl_min_um',
  'sl_max_um',
  'sl_mean_um',
  ...REGION_KEYS.map((k) => `${k}_fraction`),
  'force_mean',
  'gap_s',
  'sample_count',
] as const;

/** Quotes a field only when it must (comma, quote, CR or LF), doubling inner quotes. */
export function csvField(value: string | number | null): string {
  if (value === null) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  return /[",\r\n]/.test(value) ? `"${value.replaceAll('"', '""')}"` : value;
}

export function stridesCsv(state: TrialState): string {
  const rows = [STRIDE_COLUMNS.join(',')];
  for (const [name, m] of state.muscles) {
    for (const s of m.strides) {
      const fields: (string | number | null)[] = [
        name,
        m.side,
        s.index,
        s.startS,
        s.endS,
        s.endS - s.startS,
        s.slMinUm,
        s.slMaxUm,
        s.slMeanUm,
        ...REGION_KEYS.map((k) => s.regionFraction[k]),
        s.forceMean,
        s.gapS,
        s.sampleCount,
      ];
      rows.push(fields.map(csvField).join(','));
    }
  }
  return `${rows.join('\r\n')}\r\n`;
}
