/**
 * The study report in a real browser, at two window widths: Debian's headless Chromium lays the page out
 * with the network switched off, and a copy of the page with a measuring script added (the report itself
 * has none) says which drawing of each figure it shows, how wide, and how large its tick labels come out.
 * Skips, saying why, when no Chromium is installed (CI installs it).
 */
import { readFile, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FIGURE_WIDTHS_PX } from '../../src/report/study-figure-html.ts';
import { STUDY_TEXT_PX } from '../../src/report/study-plot-specs.ts';
import { studyReportHtml } from '../../src/report/study-report-html.ts';
import { trialFolder, type TrialFolder } from '../study/generated-trials.ts';
import { generatedStudy, STUDY_PLAN } from './generated-study.ts';
import { CHROMIUM, CHROMIUM_SKIP_NOTE as SKIP_NOTE, headlessChromium } from './headless-chromium.ts';

/** A window as wide as a desktop screen's browser, and one as wide as a laptop's half-screen. */
const WIDE = 1400;
const NARROW = 800;

/** What the measuring script reports for one figure. */
interface Measured {
  readonly id: string;
  /** The classes of the drawings shown (exactly one is expected). */
  readonly shown: string[];
  /** The figure's column width and its shown drawing's width on screen, px. */
  readonly column: number;
  readonly drawn: number;
  /** The shown drawing's own width (its SVG's width attribute), px. */
  readonly natural: number;
  /** The smallest tick label as it comes out on screen, px. */
  readonly tickPx: number;
}

const MEASURE = `<pre id="measured"></pre><script>
const figures = [...document.querySelectorAll('figure.study')].map((f) => {
  const shown = [...f.querySelectorAll('.render')].filter((r) => getComputedStyle(r).display !== 'none');
  const svg = shown[0].querySelector('svg');
  const natural = Number(svg.getAttribute('width'));
  const drawn = svg.getBoundingClientRect().width;
  const ticks = [...svg.querySelectorAll('.role-axis-label text')].map((t) => parseFloat(t.getAttribute('font-size')));
  return { id: f.id, shown: shown.map((r) => r.className), column: f.getBoundingClientRect().width, drawn, natural, tickPx: Math.min(...ticks) * drawn / natural };
});
document.getElementById('measured').textContent = JSON.stringify(figures);
</script>`;

let folder: TrialFolder;
let reportPath = '';
let measuringPath = '';
beforeAll(async () => {
  folder = await trialFolder('lengthwise-study-chromium-');
  const html = await studyReportHtml(generatedStudy(STUDY_PLAN));
  reportPath = join(folder.dir, 'study-report.html');
  measuringPath = join(folder.dir, 'study-report-measuring.html');
  await writeFile(reportPath, html);
  await writeFile(measuringPath, html.replace('</body>', `${MEASURE}</body>`));
});
afterAll(() => folder.remove());

function chromium(args: readonly string[]): Promise<string> {
  return headlessChromium(folder.dir, args);
}

async function measure(windowWidth: number): Promise<Measured[]> {
  const dom = await chromium(['--dump-dom', `--window-size=${windowWidth},900`, pathToFileURL(measuringPath).href]);
  const json = /<pre id="measured">([^<]*)<\/pre>/.exec(dom)?.[1];
  if (json === undefined || json === '') throw new Error(`the measuring script left nothing at ${windowWidth} px`);
  return JSON.parse(json.replaceAll('&quot;', '"')) as Measured[];
}

describe('the study report in headless Chromium', () => {
  it('fills the column with each figure at both widths, the widest drawing that fits, tick labels at 12 px or more', async (ctx) => {
    if (CHROMIUM === null) ctx.skip(SKIP_NOTE);
    const wide = await measure(WIDE);
    const narrow = await measure(NARROW);
    expect(wide.map((f) => f.id)).toEqual(['figure-1', 'figure-2', 'figure-3', 'figure-4', 'figure-5']);
    expect(narrow.map((f) => f.id)).toEqual(wide.map((f) => f.id));
    for (const [page, figures] of [
      [WIDE, wide],
      [NARROW, narrow],
    ] as const) {
      for (const f of figures) {
        const where = `${f.id} in a ${page} px window`;
        expect(f.shown, where).toHaveLength(1);
        // The drawing takes the column's whole width, and is never shown smaller than it was drawn.
        expect(Math.abs(f.drawn - f.column), where).toBeLessThanOrEqual(1);
        expect(f.drawn / f.natural, where).toBeGreaterThanOrEqual(0.999);
        // The widest drawing that fits: the next one up would not.
        const next = FIGURE_WIDTHS_PX.find((w) => w > f.natural + 20);
        if (next !== undefined) expect(next, where).toBeGreaterThan(f.column);
        expect(f.tickPx, where).toBeGreaterThanOrEqual(STUDY_TEXT_PX);
        expect(f.tickPx, where).toBeLessThanOrEqual(STUDY_TEXT_PX * 1.3);
      }
    }
    // The figures follow the page's width: wider on the wide page, from a wider drawing.
    wide.forEach((f, i) => {
      const other = narrow[i] as Measured;
      expect(f.drawn).toBeGreaterThan(other.drawn + 300);
      expect(f.natural).toBeGreaterThan(other.natural);
    });
  }, 120_000);

  it('renders screenshots offline at both widths', async (ctx) => {
    if (CHROMIUM === null) ctx.skip(SKIP_NOTE);
    for (const width of [WIDE, NARROW]) {
      const shot = join(folder.dir, `study-report-${width}.png`);
      await chromium([`--screenshot=${shot}`, `--window-size=${width},1600`, pathToFileURL(reportPath).href]);
      const png = await readFile(shot);
      // PNG signature, then the IHDR chunk's width and height (big-endian) at bytes 16–23.
      expect(png.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
      expect([png.readUInt32BE(16), png.readUInt32BE(20)]).toEqual([width, 1600]);
      // A page of text and plots, not a blank or error page: a blank page this size compresses to a few kB.
      expect(png.length).toBeGreaterThan(60_000);
      const keep = process.env['LENGTHWISE_KEEP_SCREENSHOT'];
      if (keep !== undefined) await writeFile(keep.replace(/(\.png)?$/, `-study-${width}.png`), png);
    }
  }, 120_000);
});
