/** The lines of a lengthwise-stream trial file, each with the record it holds, for tests that rewrite a trial. */
import { readFile } from 'node:fs/promises';

export interface TrialLine {
  /** The line as written. */
  readonly text: string;
  /** Its JSON value; null for a line that is not JSON (one of the trial's own bad lines). */
  readonly record: Record<string, unknown> | null;
}

export async function trialLines(path: string): Promise<TrialLine[]> {
  return (await readFile(path, 'utf8')).split('\n').map((text) => {
    try {
      return { text, record: JSON.parse(text) as Record<string, unknown> | null };
    } catch {
      return { text, record: null };
    }
  });
}
