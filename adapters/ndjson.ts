/** NDJSON lines of the lengthwise-stream format → frames: one JSON object a line, each line one frame. */
import type { Frame } from '../src/records.ts';
import { parseJsonText } from './parse-record.ts';

/**
 * One NDJSON line (line ending removed) → one frame: a record, or a Rejection that says what failed.
 * Never throws. Blank lines are the reader's business (readLines skips them); here a blank line is not_json.
 */
export function parseNdjsonLine(text: string, line: number): Frame {
  return parseJsonText(text, line);
}
