/**
 * A small, independent reading of the lengthwise-stream rules, used by the generator's tests to check
 * that every line is the record or the bad line it was meant to be. Not the tool's reader.
 */
import type { RejectReason } from '../../src/trial/reasons.ts';

export type LineKind = 'header' | 'sample' | 'event' | 'marker' | RejectReason;

const UNSAFE = new Set(['__proto__', 'constructor', 'prototype']);

function depth(v: unknown): number {
  if (v === null || typeof v !== 'object') return 0;
  let d = 0;
  for (const x of Object.values(v)) d = Math.max(d, depth(x));
  return d + 1;
}

function hasUnsafeKey(v: unknown): boolean {
  if (v === null || typeof v !== 'object') return false;
  return Object.keys(v).some((k) => UNSAFE.has(k)) || Object.values(v).some(hasUnsafeKey);
}

export interface Classifier {
  ndjson(line: string): LineKind;
  csv(row: string): LineKind;
}

export function createClassifier(maxLineChars = 100_000): Classifier {
  const lastT = new Map<string, number>();
  const sample = (t: unknown, muscle: unknown, f: unknown, p: unknown, q: unknown): LineKind => {
    if (typeof t !== 'number' || typeof muscle !== 'string' || typeof f !== 'number') return 'schema';
    if (p !== undefined && typeof p !== 'number') return 'schema';
    if (q !== undefined && typeof q !== 'number') return 'schema';
    if (!Number.isFinite(t) || !(f > 0) || (p !== undefined && !(p >= 0 && p <= 90)) || (q !== undefined && !(q >= 0 && q <= 1))) {
      return 'out_of_range';
    }
    const prev = lastT.get(muscle);
    if (prev !== undefined && t < prev) return 'time_not_increasing';
    if (prev !== undefined && t === prev) return 'duplicate';
    lastT.set(muscle, t);
    return 'sample';
  };
  const event = (name: unknown, side: unknown): LineKind => {
    if (name !== 'foot_strike' && name !== 'toe_off') return 'unknown_event';
    return side === 'left' || side === 'right' ? 'event' : 'schema';
  };
  return {
    ndjson(line) {
      if (line.length > maxLineChars) return 'line_too_long';
      let v: unknown;
      try {
        v = JSON.parse(line);
      } catch {
        return 'not_json';
      }
      if (depth(v) > 8) return 'too_deep';
      if (hasUnsafeKey(v)) return 'unsafe_key';
      if (v === null || typeof v !== 'object' || Array.isArray(v)) return 'schema';
      const r = v as Record<string, unknown>;
      if (r['format'] === 'lengthwise-stream' && r['version'] === 1) {
        // A trial takes at most 64 muscles (the README), so a header declaring more is refused.
        const muscles = r['muscles'];
        return muscles !== null && typeof muscles === 'object' && Object.keys(muscles).length > 64 ? 'too_many_muscles' : 'header';
      }
      if ('event' in r) return event(r['event'], r['side']);
      if (typeof r['marker'] === 'string' && typeof r['t'] === 'number') return 'marker';
      if ('fascicle_mm' in r) return sample(r['t'], r['muscle'], r['fascicle_mm'], r['pennation_deg'], r['quality']);
      return 'schema';
    },
    csv(row) {
      if (row.length > maxLineChars) return 'line_too_long';
      // Rows of our generator quote nothing, so any quote here is a broken one; short rows are padded.
      if (row.includes('"')) return 'not_json';
      const cols = row.split(',');
      if (cols.length > 7) return 'not_json';
      while (cols.length < 7) cols.push('');
      const [t, muscle, f, p, q, ev, side] = cols as [string, string, string, string, string, string, string];
      const num = (s: string): number | undefined => (s === '' ? undefined : Number(s));
      if (ev !== '') return muscle === '' && f === '' ? event(ev, side) : 'schema';
      const fv = num(f);
      if (fv === undefined || Number.isNaN(fv)) return 'schema';
      return sample(num(t), muscle === '' ? undefined : muscle, fv, num(p), num(q));
    },
  };
}
