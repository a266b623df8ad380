/** Writes the study report to a file, atomically; failures come back as data. */
import { writeFileAtomic, type WriteResult } from '../output/write-file.ts';
import { studyReportHtml, type StudyReportOptions } from './study-report-html.ts';
import type { StudyReportInput } from './study-report-input.ts';

export async function writeStudyReport(path: string, input: StudyReportInput, options: StudyReportOptions = {}): Promise<WriteResult> {
  let html: string;
  try {
    html = await studyReportHtml(input, options);
  } catch (error) {
    return { ok: false, path, message: `could not draw the study report for ${path}: ${error instanceof Error ? error.message : String(error)}` };
  }
  return writeFileAtomic(path, html);
}
