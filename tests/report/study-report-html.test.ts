import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FIGURE_WIDTHS_PX, SAVED_WIDTH_PX } from '../../src/report/study-figure-html.ts';
import { studyReportHtml } from '../../src/report/study-report-html.ts';
import type { StudyReportInput } from '../../src/report/study-report-input.ts';
import { STUDY_TEXT_PX } from '../../src/report/study-plot-specs.ts';
import { writeStudyReport } from '../../src/report/write-study-report.ts';
import { trialFolder, type TrialFolder } from '../study/generated-trials.ts';
import { generatedStudy, STUDY_PLAN } from './generated-study.ts';
import { checkHtml, expectFetchesNothing, expectWholeDocument, type CheckedHtml } from './html-check.ts';

const study = generatedStudy(STUDY_PLAN);
const warnings: string[] = [];
let html = '';
let checked: CheckedHtml;
let folder: TrialFolder;
beforeAll(async () => {
  html = await studyReportHtml(study, { warnings });
  checked = checkHtml(html);
  folder = await trialFolder('lengthwise-study-report-');
});
afterAll(() => folder.remove());

/** Each study figure's HTML, in the page's order. */
function figures(page: string): string[] {
  return page.match(/<figure class="study"[\s\S]*?<\/figure>/g) ?? [];
}

/** The drawings of a figure, one per width, each an inline SVG. */
function drawings(figure: string): { readonly width: number; readonly height: number; readonly svg: string }[] {
  return [...figure.matchAll(/<div class="render w\d+" style="min-width:[\d.]+px">(<svg[\s\S]*?<\/svg>)<\/div>/g)].map((m) => {
    const svg = m[1] as string;
    return { width: Number(/^<svg[^>]*\swidth="([\d.]+)"/.exec(svg)?.[1]), height: Number(/^<svg[^>]*\sheight="([\d.]+)"/.exec(svg)?.[1]), svg };
  });
}

function fontSizes(svg: string): number[] {
  return [...svg.matchAll(/<text[^>]*\sfont-size="([\d.]+)px"/g)].map((m) => Number(m[1]));
}

describe('studyReportHtml', () => {
  it('is a whole HTML document: doctype first, every tag closed in order, a language and a character set', () => {
    expectWholeDocument(checked);
  });

  it('has the methods, the figures, the tables and the provenance, in that order', () => {
    const sections = checked.elements.filter((e) => e.name === 'section').map((e) => e.attributes.id);
    expect(sections).toEqual(['methods', 'results', 'tables', 'provenance']);
    expect(html.match(/<section id="methods">[\s\S]*?<\/section>/)?.[0].match(/<p>/g)).toHaveLength(5);
  });

  it('draws the operating range and time in each region per condition, a gait-cycle figure per muscle, and the paired differences', () => {
    const kinds = checked.elements.filter((e) => e.name === 'figure' && e.attributes.class === 'study').map((e) => [e.attributes.id, e.attributes['data-plot']]);
    expect(kinds).toEqual([
      ['figure-1', 'operating-range'],
      ['figure-2', 'time-in-regions'],
      ['figure-3', 'cycle-lat_gastroc'],
      ['figure-4', 'cycle-vastus_lat'],
      ['figure-5', 'paired-differences'],
    ]);
  });

  it('gives every figure its drawings at each width, each with its own legend, a caption, and a link that saves it as SVG', () => {
    const all = figures(html);
    expect(all).toHaveLength(5);
    all.forEach((figure, i) => {
      const own = drawings(figure);
      expect(own.map((d) => d.width)).toHaveLength(FIGURE_WIDTHS_PX.length);
      for (const d of own) {
        expect(d.svg).toContain('role-legend');
        expect(d.svg).toMatch(/role="img" aria-label="[^"]+"/);
      }
      expect(figure).toMatch(new RegExp(`<figcaption><strong>Figure ${i + 1}\\.</strong> \\S`));
      const link = /<p class="save"><a download="(figure-\d+-[\w-]+\.svg)" href="data:image\/svg\+xml;base64,([A-Za-z0-9+/=]+)">Save Figure (\d+) as SVG<\/a> \((\d+) × (\d+) px\)<\/p>/.exec(figure);
      expect(link, `figure ${i + 1} has its link`).not.toBeNull();
      expect(link?.[3]).toBe(String(i + 1));
      // The link saves the drawing made for a journal page's width, as a file of its own.
      const saved = Buffer.from(link?.[2] as string, 'base64').toString('utf8');
      const drawing = own[FIGURE_WIDTHS_PX.indexOf(SAVED_WIDTH_PX as (typeof FIGURE_WIDTHS_PX)[number])];
      expect(saved.startsWith('<?xml version="1.0" encoding="utf-8"?>\n<svg xmlns="http://www.w3.org/2000/svg" ')).toBe(true);
      expect(saved.replace(/^<\?xml[^>]*>\n<svg xmlns="[^"]*"/, '<svg').trimEnd()).toBe(drawing?.svg);
      expect([Number(link?.[4]), Number(link?.[5])]).toEqual([drawing?.width, drawing?.height]);
    });
  });

  it('writes every text of every figure, tick labels first, at 12 px or more', () => {
    for (const figure of figures(html)) {
      for (const d of drawings(figure)) {
        const labels = d.svg.match(/role-axis-label[\s\S]*?<\/g>/g) ?? [];
        expect(labels.length).toBeGreaterThan(0);
        for (const group of labels) for (const size of fontSizes(group)) expect(size).toBeGreaterThanOrEqual(STUDY_TEXT_PX);
        expect(Math.min(...fontSizes(d.svg))).toBeGreaterThanOrEqual(STUDY_TEXT_PX);
      }
    }
  });

  it('draws each figure no wider than its width, and shows the widest drawing that fits the column', () => {
    for (const figure of figures(html)) {
      drawings(figure).forEach((d, i) => {
        const width = FIGURE_WIDTHS_PX[i] as number;
        expect(d.width).toBeLessThanOrEqual(width);
        expect(d.width).toBeGreaterThan(0.9 * width);
      });
    }
    for (const width of FIGURE_WIDTHS_PX.slice(1)) expect(html).toContain(`@container (min-width: ${width}px)`);
    expect(html).toContain('.render svg { display: block; width: 100%; height: auto; }');
  });

  it('fetches nothing: no script, style sheet, image or frame; links inside the page or the figures themselves; no URL in styles', () => {
    // A link goes inside the page or is a figure's own SVG file (a data: URL), left out of the text searched for URLs.
    expectFetchesNothing(checked, html.replace(/data:image\/svg\+xml;base64,[A-Za-z0-9+/=]+/g, ''), /^#|^data:image\/svg\+xml;base64,/);
  });

  it('says in each caption what is drawn and over how many subjects', () => {
    const captions = [...html.matchAll(/<figcaption><strong>Figure (\d)\.<\/strong> ([^<]*)<\/figcaption>/g)].map((m) => m[2] as string);
    expect(captions[0]).toMatch(/^Operating range of sarcomere length in each condition \(n = 7–8 subjects\)\. Bar: group mean of the subjects&#39; 5th to 95th percentile/);
    expect(captions[1]).toMatch(/^Time in each region of the force–length curve in each condition/);
    expect(captions[2]).toContain("lat_gastroc (left): sarcomere length over the gait cycle in each condition, group mean (line) ± SD across subjects (band)");
    expect(captions[2]).toContain("0 % is the foot strike of the muscle&#39;s side.");
    // One subject's vastus_lat strides were estimated: the caption says what 0 % is for those trials.
    expect(captions[3]).toContain('except in 6 of 45 trials whose strides were estimated from the fascicle signal and start at its shortest length');
    expect(captions[4]).toMatch(/^Paired differences between conditions, b − a, over the subjects who had both \(n = 7–8 subjects with both\)/);
  });

  it("lists the group values and the comparisons as the tables give them", () => {
    const walk = study.groups.find((g) => g.condition === 'level walk' && g.muscle === 'lat_gastroc' && g.figure === 'sl_mean_um');
    expect(html).toContain(`${walk?.mean?.toFixed(3)} ± ${walk?.sd?.toFixed(3)}<br><span class="ci">[${walk?.ci95_low?.toFixed(3)}, ${walk?.ci95_high?.toFixed(3)}]</span>`);
    const plateau = study.groups.find((g) => g.condition === 'level run' && g.muscle === 'vastus_lat' && g.figure === 'plateau_fraction');
    expect(html).toContain(`${(100 * (plateau?.mean as number)).toFixed(1)} ± ${(100 * (plateau?.sd as number)).toFixed(1)}`);
    const table2 = html.match(/<figure class="table" id="table-2">[\s\S]*?<\/figure>/)?.[0] ?? '';
    // Per muscle: six length figures, the three regions reached, mean force; three pairs of conditions each.
    expect(table2.match(/<tr[ >]/g)).toHaveLength(1 + 2 * 10 * 3);
    // Negative numbers with a true minus sign, as on the figures' axes.
    const num = (x: number | null | undefined, digits: number) => (x as number).toFixed(digits).replace(/^-/, '−');
    const c = study.comparisons.find((r) => r.muscle === 'vastus_lat' && r.figure === 'sl_mean_um' && r.condition_a === 'level walk' && r.condition_b === 'level run');
    expect(c?.mean_diff).toBeLessThan(0);
    expect(table2).toContain(
      `<td>level run − level walk</td><td class="num">${c?.n_pairs}</td><td class="num">${num(c?.mean_diff, 3)} [${num(c?.ci95_low, 3)}, ${num(c?.ci95_high, 3)}]</td><td class="num">${num(c?.t, 2)}</td>`,
    );
    // A difference of time fractions is in percentage points.
    const plateauDiff = study.comparisons.find((r) => r.muscle === 'vastus_lat' && r.figure === 'plateau_fraction' && r.condition_a === 'level walk' && r.condition_b === 'level run');
    expect(table2).toContain(
      `<td>plateau <span class="unit">(percentage points)</span></td><td>level run − level walk</td><td class="num">${plateauDiff?.n_pairs}</td><td class="num">${num(100 * (plateauDiff?.mean_diff as number), 1)} [`,
    );
  });

  it('shows the provenance in full: every setting, every calibration, every input file with its digest, the markers', () => {
    const provenance = html.match(/<section id="provenance">[\s\S]*?<\/section>/)?.[0] ?? '';
    expect(provenance).toContain('Made by lengthwise 9.4.2 at 2026-12-03T09:30:00Z (UTC).');
    for (const key of ['quality_gate', 'gap_threshold_s', 'smoothing.process_noise_mm2_per_s', 'stride_period_range_s']) expect(provenance).toContain(`<code>${key}</code>`);
    for (const f of study.provenance.inputs) expect(provenance).toContain(`<td><code>${f.path}</code></td><td>${f.kind}</td><td class="num">${f.bytes}</td><td><code class="hash">${f.sha256}</code></td>`);
    expect(provenance.match(/<tr>/g)?.length).toBeGreaterThan(study.provenance.inputs.length + study.provenance.calibration.length);
    expect(provenance).toContain('<td>probe re-taped</td>');
  });

  it('escapes the text it is given', async () => {
    const odd = generatedStudy({ ...STUDY_PLAN, conditions: [{ name: 'shoes <A&B>', shiftUm: 0, depthScale: 1 }, { name: "barefoot 'x'", shiftUm: 0.05, depthScale: 1 }] });
    const page = await studyReportHtml({ ...odd, title: 'Study <1> & "2"' });
    expect(checkHtml(page).problems).toEqual([]);
    expect(page).toContain('<title>Study &lt;1&gt; &amp; &quot;2&quot;</title>');
    expect(page).toContain('<th>shoes &lt;A&amp;B&gt;</th>');
    expect(page).not.toContain('shoes <A&B>');
  });

  it('leaves out the differences figure and table when there is one condition, and draws nothing when there are no rows', async () => {
    const one = await studyReportHtml(generatedStudy({ ...STUDY_PLAN, conditions: [STUDY_PLAN.conditions[0]!] }));
    expect(figures(one).map((f) => /data-plot="([^"]+)"/.exec(f)?.[1])).toEqual(['operating-range', 'time-in-regions', 'cycle-lat_gastroc', 'cycle-vastus_lat']);
    expect(one).toContain('No pair of conditions to compare.');
    const empty: StudyReportInput = { trials: [], groups: [], comparisons: [], cycles: [], provenance: { ...study.provenance, inputs: [], calibration: [], settings: {} } };
    const page = await studyReportHtml(empty);
    expect(checkHtml(page).problems).toEqual([]);
    expect(figures(page)).toEqual([]);
    expect(page).toContain('The study has no group rows to draw.');
    expect(page).toContain('The study has no group values.');
  });

  it('is the same page, byte for byte, from the same rows, and draws with no warning from the plotting libraries', async () => {
    expect(await studyReportHtml(study)).toBe(html);
    expect(warnings).toEqual([]);
  });

  it('writes the page to a file, and says why when it cannot', async () => {
    const path = join(folder.dir, 'study-report.html');
    expect(await writeStudyReport(path, study)).toEqual({ ok: true, path });
    expect(await readFile(path, 'utf8')).toBe(html);
    // A folder in the path is a file: nothing can be written there.
    const blocked = join(path, 'study-report.html');
    const failed = await writeStudyReport(blocked, study);
    expect(failed.ok).toBe(false);
    if (!failed.ok) expect(failed.message).toContain(blocked);
  });
});
