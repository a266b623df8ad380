/**
 * The report in a real browser: Debian's headless Chromium parses it (the DOM it builds has every plot as
 * an SVG element) and renders a screenshot with the network switched off. Skips, saying why, when no
 * Chromium is installed (CI installs it).
 */
import { readFile, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { reportHtml } from '../../src/report/report-html.ts';
import { summarizeTrial } from '../../src/study/summarize-trial.ts';
import type { SummaryJson } from '../../src/output/summary-json.ts';
import { trialFolder, type TrialFolder } from '../study/generated-trials.ts';
import { CHROMIUM, CHROMIUM_SKIP_NOTE as SKIP_NOTE, headlessChromium } from './headless-chromium.ts';

let folder: TrialFolder;
let reportPath = '';
let muscles = 0;
beforeAll(async () => {
  folder = await trialFolder('lengthwise-chromium-');
  const summaries: SummaryJson[] = [];
  for (const [name, seed, scenario] of [['walk.ndjson', 71, 'walk'], ['run.ndjson', 72, 'run']] as const) {
    const outcome = await summarizeTrial((await folder.trial(name, { seed, scenario, subject: 'SYN-401' })).path);
    if (!outcome.ok) throw new Error(outcome.message);
    summaries.push(outcome.summary);
    muscles += Object.keys(outcome.summary.muscles).length;
  }
  reportPath = join(folder.dir, 'report.html');
  await writeFile(reportPath, await reportHtml(summaries, { title: 'Invented study in a browser' }));
});
afterAll(() => folder.remove());

function chromium(args: readonly string[]): Promise<string> {
  return headlessChromium(folder.dir, args);
}

describe('the report in headless Chromium', () => {
  it('is parsed into a page with every plot as an SVG element', async (ctx) => {
    if (CHROMIUM === null) ctx.skip(SKIP_NOTE);
    const dom = await chromium(['--dump-dom', pathToFileURL(reportPath).href]);
    expect(dom).toContain('<title>Invented study in a browser</title>');
    expect(dom.match(/<section class="entry"/g)).toHaveLength(muscles);
    expect(dom.match(/<svg/g)).toHaveLength(muscles * 3 + 2);
    // Every plot has its axes drawn as text inside the SVG.
    expect(dom).toContain('sarcomere length (µm)');
  }, 90_000);

  it('renders a screenshot offline', async (ctx) => {
    if (CHROMIUM === null) ctx.skip(SKIP_NOTE);
    const shot = join(folder.dir, 'report.png');
    await chromium([`--screenshot=${shot}`, '--window-size=1200,900', pathToFileURL(reportPath).href]);
    const png = await readFile(shot);
    // PNG signature, then the IHDR chunk's width and height (big-endian) at bytes 16–23.
    expect(png.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
    expect([png.readUInt32BE(16), png.readUInt32BE(20)]).toEqual([1200, 900]);
    // A page of plots, not a blank or error page: a blank 1200 × 900 PNG compresses to a few kB.
    expect(png.length).toBeGreaterThan(40_000);
    if (process.env['LENGTHWISE_KEEP_SCREENSHOT'] !== undefined) await writeFile(process.env['LENGTHWISE_KEEP_SCREENSHOT'], png);
  }, 90_000);
});
