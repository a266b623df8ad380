/**
 * The session log's format (lengthwise-session-log, one line per record received, in received order).
 *
 * The log is itself a lengthwise-stream NDJSON file, so `lengthwise replay` reads it:
 * - a valid record is written as the record, with one extra key `"rx"` (receive time, Unix seconds),
 *   which the record parser ignores;
 * - rejected records are summed up, one line per reason for what was received within a flush of the
 *   log: `{"rejected": REASON, "count": N, "rx", "message", "excerpt"}` (the first one's message and
 *   excerpt), which the reader counts as N rejections for that reason, so a replay counts the same
 *   rejections and the log grows with what was received, never with how many ways it was wrong;
 * - a device whose clock restarted (a ClockReset record) is a line of its own kind, `{"t", "clock_reset":
 *   {"offset_s", "muscles": [NAME, …] | null, "detail"}, "rx"}`, and that device's records after it are
 *   written with their times shifted by the offset, as the session took them;
 * - a lost connection (a Disconnection record) is a line of its own kind, `{"t", "disconnected":
 *   {"muscles": [NAME, …] | null, "detail"}, "rx"}` (`t` left out when the connection carried no time);
 *   logs written before this line existed carry a `[link] disconnected` marker instead, which the
 *   reader still takes for the same record.
 * Samples rejected later by the pipeline (time going backwards, duplicates, too many muscles) are
 * written as received, so the replay's pipeline rejects them again. Every line is a JSON object, so a
 * line cut short by a crash is never valid: at worst it is one not_json rejection. Logs written before
 * rejections were summed up have one line per rejection, built so that the reader rejects it again for
 * the same reason; they replay as they always did.
 */
import type { Frame, Header, Rejection } from '../trial/records.ts';
import { headerJsonOf } from '../../adapters/device-mapping.ts';
import { DEFAULT_MAX_LINE_BYTES } from '../../adapters/read-lines.ts';

/** Receive time as written: Unix seconds with millisecond resolution. */
export function rxText(rxMs: number): string {
  return (rxMs / 1000).toFixed(3);
}

/** Longest line the log writes: the file reader's cap, so every line of the log replays. */
export const MAX_LOG_LINE_BYTES = DEFAULT_MAX_LINE_BYTES;

/** The line that stands for `count` rejections of r's reason, with r's message and excerpt. */
export function rejectionLine(r: Rejection, count: number, rxMs: number): string {
  return `{"rejected":${JSON.stringify(r.reason)},"count":${count},"rx":${rxText(rxMs)},"message":${JSON.stringify(r.message)},"excerpt":${JSON.stringify(r.excerpt)}}`;
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
 * (gaps, notices, …), which a replay derives again. A rejection is its own line here; the session log
 * sums rejections up by reason (see writeSessionLog).
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
    case 'clock_reset':
      return `{"t":${num(f.tS)},"clock_reset":{"offset_s":${num(f.offsetS)},"muscles":${JSON.stringify(f.muscles)},"detail":${JSON.stringify(f.detail)}},"rx":${rx}}`;
    case 'disconnection': {
      const t = Number.isNaN(f.tS) ? '' : `"t":${num(f.tS)},`;
      return `{${t}"disconnected":{"muscles":${JSON.stringify(f.muscles)},"detail":${JSON.stringify(f.detail)}},"rx":${rx}}`;
    }
    case 'header':
      return headerLine(f, rx);
    case 'rejection':
      return rejectionLine(f, f.count ?? 1, rxMs);
    default:
      return null;
  }
}
