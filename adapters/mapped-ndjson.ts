/**
 * NDJSON lines in a device's own field names and units → frames, through a device mapping (see
 * device-mapping.ts): a recorded device file replays as the live stream it came from would. Each line
 * is parsed, mapped, then judged by the same record parser as any line, so the reasons are the same.
 */
import type { Frame } from '../src/trial/records.ts';
import { applyMapping, type DeviceMapping } from './device-mapping.ts';
import { EXCERPT_CHARS } from './limits.ts';
import { parseRecordValue, readJson } from './parse-record.ts';
import type { LineReader } from './read-lines.ts';

export function createMappedNdjsonReader(mapping: DeviceMapping): LineReader {
  const text = (line: string, lineNumber: number): Frame => {
    const json = readJson(line, lineNumber);
    // The excerpt is the device's own line, as the person knows it.
    return json.ok ? parseRecordValue(applyMapping(json.value, mapping), lineNumber, line.slice(0, EXCERPT_CHARS)) : json.rejection;
  };
  return {
    text,
    bytes: (b, start, end, lineNumber) => text(b.toString('utf8', start, end), lineNumber),
  };
}
