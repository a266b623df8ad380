/** Writes the HTML report of some trials' summaries to a file, atomically; failures come back as data. */
import type { SummaryJson } from '../output/summary-json.ts';
import { writeFileAtomic, type WriteResult } from '../output/write-file.ts';
import { reportHtml, type ReportOptions } from './report-html.ts';

export async function writeReport(path: string, summaries: readonly SummaryJson[], options: ReportOptions = {}): Promise<WriteResult> {
  let html: string;
  try {
    html = await reportHtml(summaries, options);
  } catch (error) {
    return { ok: false, path, message: `could not draw the report for ${path}: ${error instanceof Error ? error.message : String(error)}` };
  }
  return writeFileAtomic(path, html);
}
