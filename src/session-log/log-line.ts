/**
 * The session log's format (lengthwise-session-log, one line per frame received, in received order).
 *
 * The log is itself a lengthwise-stream NDJSON file, so `lengthwise replay` reads it:
 * - a valid record is written as the record, with one extra key `"rx"` (receive time, Unix seconds),
 *   which the record parser ignores;
 * - a rejected record is written as a line of our own shape, `{"rejected": REASON, "rx", "message",
 *   "excerpt", …}`, built so that the parser rejects it again for the same reason (the reason-specific
 *   tail below does that), so a replay counts the same rejections;
 * - a lost connection (a Disconnection record) is a line of its own kind, `{"t", "disconnected":
 *   {"muscles": [NAME, …] | null, "detail"}, "rx"}` (`t` left out when the connection carried no time);
 *   logs written before this line existed carry a `[link] disconnected` marker instead, which the
 *   reader still takes for the same record.
 * Samples rejected later by the pipeline (time going backwards, duplicates) are written as received,
 * so the replay's pipeline rejects them again. Every line is a JSON object, so a line cut short by a
 * crash is never valid: at worst it is one not_json rejection.
 */
import type { Frame, Header, Rejection } from '../trial/records.ts';
import type { RejectReason } from '../trial/reasons.ts';
import { headerJsonOf } from '../../adapters/device-mapping.ts';
import { DEFAULT_MAX_LINE_BYTES } from '../../adapters/read-lines.ts';

/** Receive time as written: Unix seconds with millisecond resolution. */
export function rxText(rxMs: number): string {
  return (rxMs / 1000).toFixed(3);
}

/** The nesting that makes the parser say too_deep (deeper than its 8 levels). */
const TOO_DEEP_TAIL = ',"nesting":[[[[[[[[[[]]]]]]]]]]';

/** What each reason's line adds so that the record parser gives that reason again. */
const REASON_TAIL: Readonly<Record<RejectReason, string>> = {
  // A trailing comma: not JSON, and no prefix of the line is JSON either.
  not_json: ',',
  // An object of no record kind.
  schema: '',
  // A sample whose fascicle length is 0.
  out_of_range: ',"t":0,"muscle":"(rejected)","fascicle_mm":0',
  unknown_event: ',"t":0,"event":"(rejected)","side":"left"',
  unsafe_key: ',"__proto__":null',
  too_deep: TOO_DEEP_TAIL,
  // Only made by the pipeline, never by an adapter: written as schema, should one ever reach the log.
  time_not_increasing: '',
  duplicate: '',
  // Padded past the reader's line cap (below).
  line_too_long: '',
};

function rejectionLine(r: Rejection, rx: string): string {
  const head = `{"rejected":${JSON.stringify(r.reason)},"rx":${rx},"message":${JSON.stringify(r.message)},"excerpt":${JSON.stringify(r.excerpt)}`;
  if (r.reason !== 'line_too_long') return `${head}${REASON_TAIL[r.reason]}}`;
  const open = `${head},"padding":"`;
  const close = '"}';
  const used = Buffer.byteLength(open) + close.length;
  return `${open}${' '.repeat(Math.max(0, DEFAULT_MAX_LINE_BYTES + 1 - used))}${close}`;
}

function headerLine(h: Header, rx: string): string {
  const raw = headerJsonOf(h);
  if (raw !== undefined && raw.startsWith('{') && raw.endsWith('}') && raw !== '{}') return `${raw.slice(0, -1)},"rx":${rx}}`;
  // Without the header as received (made by hand), its own fields; a calibration is not kept then.
  const o: Record<string, unknown> = { format: 'lengthwise-stream', version: 1 };
  if (h.subject !== undefined) o['subject'] = h.subject;
  if (h.trial !== undefined) o['trial'] = h.trial;
  if (h.rateHz !== undefined) o['rate_hz'] = h.rateHz;
  if (Object.keys(h.muscles).length > 0) o['muscles'] = { ...h.muscles };
  const text = JSON.stringify(o);
  return `${text.slice(0, -1)},"rx":${rx}}`;
}

/** A number as JSON, keeping the sign of a negative zero (JSON.stringify drops it). */
function num(x: number): string {
  return Object.is(x, -0) ? '-0' : JSON.stringify(x);
}

/**
 * One frame → its line of the session log (no line ending), or null for frames the pipeline derives
 * (gaps, notices, …), which a replay derives again.
 */
export function logLine(f: Frame, rxMs: number): string | null {
  const rx = rxText(rxMs);
  switch (f.kind) {
    case 'sample': {
      let text = `{"t":${num(f.tS)},"muscle":${JSON.stringify(f.muscle)},"fascicle_mm":${num(f.fascicleMm)}`;
      if (!Number.isNaN(f.pennationDeg)) text += `,"pennation_deg":${num(f.pennationDeg)}`;
      if (f.quality !== 1) text += `,"quality":${num(f.quality)}`;
      return `${text},"rx":${rx}}`;
    }
    case 'event':
      return `{"t":${num(f.tS)},"event":"${f.event}","side":"${f.side}","rx":${rx}}`;
    case 'marker':
      return `{"t":${num(f.tS)},"marker":${JSON.stringify(f.marker)},"rx":${rx}}`;
    case 'disconnection': {
      const t = Number.isNaN(f.tS) ? '' : `"t":${num(f.tS)},`;
      return `{${t}"disconnected":{"muscles":${JSON.stringify(f.muscles)},"detail":${JSON.stringify(f.detail)}},"rx":${rx}}`;
    }
    case 'header':
      return headerLine(f, rx);
    case 'rejection':
      return rejectionLine(f, rx);
    default:
      return null;
  }
}
