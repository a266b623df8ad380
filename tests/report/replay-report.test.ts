import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { SummaryJson } from '../../src/output/summary-json.ts';
import { reportHtml } from '../../src/report/report-html.ts';
import { runLengthwise } from '../helpers/command-child.ts';
import { trialFolder, type TrialFolder } from '../study/generated-trials.ts';
import { checkHtml } from './html-check.ts';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));

let folder: TrialFolder;
beforeAll(async () => {
  folder = await trialFolder('lengthwise-replay-report-');
});
afterAll(() => folder.remove());

describe('lengthwise replay --report', () => {
  it('writes the report of the trial, drawn from exactly the summary that --summary writes', async () => {
    const { path } = await folder.trial('replayed.ndjson', { seed: 61, subject: 'SYN-301' });
    const summaryPath = join(folder.dir, 'summary.json');
    const reportPath = join(folder.dir, 'report.html');
    const { code, stderr } = await runLengthwise(['replay', path, '--speed', 'max', '--plain', '--summary', summaryPath, '--report', reportPath], { cwd: ROOT, env: process.env });
    expect(code, stderr).toBe(0);
    expect(stderr).toContain(`report written to ${reportPath}`);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8')) as SummaryJson;
    const html = await readFile(reportPath, 'utf8');
    expect(html).toBe(await reportHtml([summary], { title: `lengthwise report: ${summary.trial ?? summary.source}` }));
    const checked = checkHtml(html);
    expect(checked.problems).toEqual([]);
    expect(checked.elements.filter((e) => e.name === 'section' && e.attributes.class === 'entry')).toHaveLength(2);
  });

  it('says when the report cannot be written and exits 1', async () => {
    const { path } = await folder.trial('blocked.ndjson', { seed: 62, durationS: 3 });
    const blocker = await folder.file('a-file', 'x');
    const failed = await runLengthwise(['replay', path, '--speed', 'max', '--plain', '--report', join(blocker, 'report.html')], { cwd: ROOT, env: process.env });
    expect(failed.code).toBe(1);
    expect(failed.stderr).toMatch(/could not write .*report\.html/);
  });
});
