/**
 * Deliberately bad lines, one kind per rejection reason, as a device or a damaged file could produce
 * them. Each is built so that it can never be read as a valid record, even by a reader that misses the
 * intended reason (a too-long line or a too-deep one also lacks the fields of any record).
 */
import { REJECT_REASONS, type RejectReason } from '../trial/reasons.ts';
import type { WireSample } from './wire.ts';
import { formatNumber } from './format-number.ts';
import { MAX_MUSCLES_PER_TRIAL } from '../trial/settings.ts';

export interface BadLineContext {
  /** Time to write into the line (s): between two sample ticks, so order checks never fire first. */
  readonly tS: number;
  readonly muscle: string;
  /** The muscle's newest valid sample, for copies that go back in time or repeat a time. */
  readonly last: WireSample | null;
  /** Picks among the variants of a reason (out_of_range has three). */
  readonly variant: number;
  /** Length of the line_too_long line, characters. */
  readonly longLineChars: number;
  /** The receiver's muscle cap: a too_many_muscles header declares one more. @default MAX_MUSCLES_PER_TRIAL */
  readonly maxMuscles?: number;
}

/** Reasons that need a previous sample of the muscle to copy. */
export const ORDER_REASONS: readonly RejectReason[] = ['time_not_increasing', 'duplicate'];

/** Reasons a CSV row can carry; unsafe keys, deep nesting and a header declaring muscles have no CSV form. */
export const CSV_BAD_LINE_REASONS: readonly RejectReason[] = REJECT_REASONS.filter((r) => r !== 'unsafe_key' && r !== 'too_deep' && r !== 'too_many_muscles');

function sampleJson(s: WireSample): string {
  return JSON.stringify(s);
}

/** The bad line as NDJSON text, or null when it needs a previous sample and there is none. */
export function badLineNdjson(reason: RejectReason, ctx: BadLineContext): string | null {
  const t = ctx.tS;
  const m = JSON.stringify(ctx.muscle);
  switch (reason) {
    case 'not_json':
      // A line cut off mid-number, as after a lost packet or a truncated write.
      return `{"t":${t},"muscle":${m},"fascicle_mm":4`;
    case 'schema':
      return `{"t":${t},"muscle":${m},"fascicle_mm":"${ctx.last?.fascicle_mm ?? 45}"}`;
    case 'out_of_range': {
      const variants = [
        `{"t":${t},"muscle":${m},"fascicle_mm":-3.2,"pennation_deg":20,"quality":0.9}`,
        `{"t":${t},"muscle":${m},"fascicle_mm":${ctx.last?.fascicle_mm ?? 45},"pennation_deg":97.5,"quality":0.9}`,
        `{"t":${t},"muscle":${m},"fascicle_mm":${ctx.last?.fascicle_mm ?? 45},"pennation_deg":20,"quality":1.4}`,
      ];
      return variants[ctx.variant % variants.length] as string;
    }
    case 'time_not_increasing':
      return ctx.last === null ? null : sampleJson({ ...ctx.last, t: roundTime(ctx.last.t - 0.5) });
    case 'duplicate':
      return ctx.last === null ? null : sampleJson(ctx.last);
    case 'line_too_long': {
      const head = `{"t":${t},"note":"`;
      const fill = Math.max(0, ctx.longLineChars - head.length - 2);
      return `${head}${'x'.repeat(fill)}"}`;
    }
    case 'unknown_event':
      return `{"t":${t},"event":"heel_off","side":"left"}`;
    case 'unsafe_key':
      return `{"t":${t},"muscle":${m},"__proto__":{"fascicle_mm":45}}`;
    case 'too_deep':
      return `{"t":${t},"nested":${'['.repeat(200)}${']'.repeat(200)}}`;
    case 'too_many_muscles': {
      // A resent header that declares one muscle more than a trial takes.
      const declared = Array.from({ length: (ctx.maxMuscles ?? MAX_MUSCLES_PER_TRIAL) + 1 }, (_, i) => `${JSON.stringify(`${ctx.muscle}-extra-${i + 1}`)}:{}`);
      return `{"format":"lengthwise-stream","version":1,"muscles":{${declared.join(',')}}}`;
    }
  }
}

/** The bad line as a CSV row, or null when the reason has no CSV form or needs a missing sample. */
export function badLineCsv(reason: RejectReason, ctx: BadLineContext): string | null {
  const t = ctx.tS;
  const m = csvField(ctx.muscle);
  const f = ctx.last?.fascicle_mm ?? 45;
  switch (reason) {
    case 'not_json':
      // A quoted cell that never closes, as in a row cut off mid-write.
      return `${t},"${ctx.muscle},${f},20`;
    case 'schema':
      return `${t},${m},n/a,20,0.9,,`;
    case 'out_of_range': {
      const variants = [`${t},${m},-3.2,20,0.9,,`, `${t},${m},${f},97.5,0.9,,`, `${t},${m},${f},20,1.4,,`];
      return variants[ctx.variant % variants.length] as string;
    }
    case 'time_not_increasing':
      return ctx.last === null ? null : csvSampleRow({ ...ctx.last, t: roundTime(ctx.last.t - 0.5) });
    case 'duplicate':
      return ctx.last === null ? null : csvSampleRow(ctx.last);
    case 'line_too_long':
      return `${t},${'x'.repeat(Math.max(0, ctx.longLineChars - 20))},,,,,`;
    case 'unknown_event':
      return `${t},,,,,heel_off,left`;
    case 'unsafe_key':
    case 'too_deep':
    case 'too_many_muscles':
      return null;
  }
}

/** A CSV field, quoted when it holds a comma, a quote or a line break. */
export function csvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

export function csvSampleRow(s: WireSample): string {
  const p = s.pennation_deg === undefined ? '' : formatNumber(s.pennation_deg);
  const q = s.quality === undefined ? '' : formatNumber(s.quality);
  return `${formatNumber(s.t)},${csvField(s.muscle)},${formatNumber(s.fascicle_mm)},${p},${q},,`;
}

/** Device times are written to the microsecond. */
export function roundTime(tS: number): number {
  return Math.round(tS * 1e6) / 1e6;
}
