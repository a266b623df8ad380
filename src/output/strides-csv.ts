/**
 * The `--strides FILE.csv` table: one row per stride and muscle, units in the column names (RFC 4180).
 * The first columns are the original ones, in their original order; later figures follow them.
 */
import { REGION_KEYS } from '../model/regions.ts';
import type { SegmentFigures, StrideSummary, TrialState } from '../trial/state.ts';
import { decimalsFor, roundTo } from './output-precision.ts';

/** Figures a stride and each of its phases have, in column order (names without the phase prefix). */
const PHASE_FIELDS = [
  'duration_s',
  'sl_min_um',
  'sl_max_um',
  'sl_mean_um',
  'sl_p5_um',
  'sl_p95_um',
  'excursion_um',
  ...REGION_KEYS.map((k) => `${k}_fraction`),
  'force_mean',
  'force_lv_mean',
  'force_tendon_mean',
  'velocity_min_mm_s',
  'velocity_max_mm_s',
  'gap_s',
] as const;

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
  'segmentation',
  'flagged',
  'gap_fraction',
  'sl_p5_um',
  'sl_p95_um',
  'excursion_um',
  'force_lv_mean',
  'force_tendon_mean',
  'velocity_min_mm_s',
  'velocity_max_mm_s',
  ...REGION_KEYS.flatMap((k) => [`${k}_probability`, `${k}_probability_p5`, `${k}_probability_p95`]),
  'toe_off_s',
  ...PHASE_FIELDS.map((f) => `stance_${f}`),
  ...PHASE_FIELDS.map((f) => `swing_${f}`),
] as const;

type Field = string | number | boolean | null;

/** Quotes a field only when it must (comma, quote, CR or LF), doubling inner quotes; booleans are true/false. */
export function csvField(value: Field): string {
  if (value === null) return '';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  return /[",\r\n]/.test(value) ? `"${value.replaceAll('"', '""')}"` : value;
}

function opt(x: number | undefined): Field {
  return x === undefined ? null : x;
}

function phaseFields(p: SegmentFigures | null | undefined): Field[] {
  if (p === null || p === undefined) return PHASE_FIELDS.map(() => null);
  return [
    p.endS - p.startS,
    p.slMinUm,
    p.slMaxUm,
    p.slMeanUm,
    p.slP5Um,
    p.slP95Um,
    p.excursionUm,
    ...REGION_KEYS.map((k) => p.regionFraction[k]),
    p.forceMean,
    p.forceLvMean,
    p.forceTendonMean,
    p.velocityMinMmS,
    p.velocityMaxMmS,
    p.gapS,
  ];
}

function strideFields(name: string, side: string | null, s: StrideSummary): Field[] {
  const durationS = s.endS - s.startS;
  const p = s.regionProbability;
  return [
    name,
    side,
    // The stride's number as the dashboard and the summary show it: 1, 2, …
    s.index + 1,
    s.startS,
    s.endS,
    durationS,
    s.slMinUm,
    s.slMaxUm,
    s.slMeanUm,
    ...REGION_KEYS.map((k) => s.regionFraction[k]),
    s.forceMean,
    s.gapS,
    s.sampleCount,
    s.segmentation ?? null,
    s.flagged === undefined ? null : s.flagged,
    durationS > 0 ? s.gapS / durationS : null,
    opt(s.slP5Um),
    opt(s.slP95Um),
    opt(s.excursionUm),
    opt(s.forceLvMean),
    opt(s.forceTendonMean),
    opt(s.velocityMinMmS),
    opt(s.velocityMaxMmS),
    ...REGION_KEYS.flatMap((k): Field[] => (p === null || p === undefined ? [null, null, null] : [p.expected[k], p.low[k], p.high[k]])),
    s.stance === null || s.stance === undefined ? null : s.stance.endS,
    ...phaseFields(s.stance),
    ...phaseFields(s.swing),
  ];
}

/** Each column's decimals (src/output/output-precision.ts), found once. */
const COLUMN_DECIMALS = STRIDE_COLUMNS.map(decimalsFor);

/** A row's fields as text, each number rounded to its column's precision. */
function rowText(fields: readonly Field[]): string {
  return fields.map((f, i) => csvField(typeof f === 'number' ? roundTo(f, COLUMN_DECIMALS[i] ?? 6) : f)).join(',');
}

/** The stride table of a trial, every figure rounded to its unit's precision. */
export function stridesCsv(state: TrialState): string {
  const rows = [STRIDE_COLUMNS.join(',')];
  for (const [name, m] of state.muscles) {
    for (const s of m.strides) rows.push(rowText(strideFields(name, m.side, s)));
  }
  return `${rows.join('\r\n')}\r\n`;
}
