import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { SummaryJson } from '../../src/output/summary-json.ts';
import { escapeHtml } from '../../src/report/html-page.ts';
import { reportHtml, trialSectionsHtml } from '../../src/report/report-html.ts';
import { writeReport } from '../../src/report/write-report.ts';
import { summarizeTrial } from '../../src/study/summarize-trial.ts';
import { trialFolder, type TrialFolder } from '../study/generated-trials.ts';
import { checkHtml, expectFetchesNothing, expectWholeDocument, type CheckedHtml } from './html-check.ts';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';

let folder: TrialFolder;
const summaries: SummaryJson[] = [];
let html = '';
let checked: CheckedHtml;
const warnings: string[] = [];
beforeAll(async () => {
  folder = await trialFolder('lengthwise-report-');
  const made = [
    await folder.trial('walk.ndjson', { seed: 51, subject: 'SYN-201' }),
    await folder.trial('run.ndjson', { seed: 52, scenario: 'run', subject: 'SYN-201' }),
    await folder.trial('walk.csv', { seed: 53, format: 'csv' }),
  ];
  for (const { path } of made) {
    const outcome = await summarizeTrial(path);
    if (!outcome.ok) throw new Error(outcome.message);
    summaries.push(outcome.summary);
  }
  html = await reportHtml(summaries, { title: 'Invented study <A&B>', warnings });
  checked = checkHtml(html);
});
afterAll(() => folder.remove());

/** The plots of one trial × muscle section, by their kind. */
function plotsOf(id: string): string[] {
  const section = checked.elements.findIndex((e) => e.name === 'section' && e.attributes.id === id);
  if (section < 0) return [];
  return checked.elements
    .filter((e) => e.name === 'figure' && e.ancestors.includes('section') && isInside(e, id))
    .map((e) => e.attributes['data-plot'] ?? '');
}

function isInside(e: { ancestors: readonly string[] }, id: string): boolean {
  // Sections are not nested: a figure belongs to the last section opened before it.
  const i = checked.elements.indexOf(e as never);
  for (let j = i; j >= 0; j--) {
    const candidate = checked.elements[j]!;
    if (candidate.name === 'section') return candidate.attributes.id === id;
  }
  return false;
}

describe('reportHtml', () => {
  it('is a whole HTML document: doctype first, every tag closed in order, a language and a character set', () => {
    expectWholeDocument(checked);
  });

  it('has the three plots of every trial × muscle, each an inline SVG', () => {
    let sections = 0;
    summaries.forEach((s, t) => {
      for (const muscle of Object.keys(s.muscles)) {
        sections++;
        expect(plotsOf(`trial-${t + 1}-${muscle}`)).toEqual(['force-length', 'cycle', 'strides']);
      }
    });
    expect(sections).toBe(6);
    const svgs = checked.elements.filter((e) => e.name === 'svg');
    // Three per muscle and two overviews, every one inside a figure and labelled for screen readers.
    expect(svgs).toHaveLength(sections * 3 + 2);
    for (const svg of svgs) {
      expect(svg.ancestors.at(-1)).toBe('figure');
      expect(svg.attributes.role).toBe('img');
      expect(svg.attributes['aria-label']).not.toBe('');
    }
  });

  it('fetches nothing: no script, style sheet, image or frame, every link inside the page, no URL in styles', () => {
    expectFetchesNothing(checked, html, /^#/);
  });

  it('summarizes every trial × muscle in a table row that links to its plots', () => {
    const rows = checked.elements.filter((e) => e.name === 'tr' && e.ancestors.includes('tbody'));
    expect(rows).toHaveLength(6);
    const links = checked.elements.filter((e) => e.name === 'a' && e.ancestors.includes('table')).map((e) => e.attributes.href);
    const ids = new Set(checked.elements.filter((e) => e.name === 'section').map((e) => `#${e.attributes.id}`));
    for (const link of links) expect(ids.has(link!)).toBe(true);
  });

  it('shows each trial\'s own figures, as in its summary', () => {
    const calf = summaries[0]!.muscles.calf!.trial;
    expect(html).toContain(`SL ${calf.sl_min_um!.toFixed(2)}–${calf.sl_max_um!.toFixed(2)} µm`);
    expect(html).toContain(`mean ${calf.sl_mean_um!.toFixed(2)} µm`);
  });

  it('lists the trials\' markers with their time and text, escaped, and has no markers section without any', async () => {
    const marked = structuredClone(summaries[0]!);
    marked.markers = [{ t_s: 0, text: 'belt 1.3 m/s' }, { t_s: 12.5, text: 'speed <up> & on' }];
    const page = await reportHtml([marked], { title: 'markers' });
    expect(page).toContain('<section id="markers">');
    expect(page).toContain('<td class="num">12.5</td><td>speed &lt;up&gt; &amp; on</td>');
    expect(html).not.toContain('<section id="markers">');
  });

  it('escapes text from the trials and the title', () => {
    expect(html).toContain('<title>Invented study &lt;A&amp;B&gt;</title>');
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;');
  });

  it('says so when trials are uncalibrated, and flags the muscles', async () => {
    // The CSV trial has no header, so no calibration: its muscles run on the baseline assumption.
    expect(summaries[2]!.calibrated).toBe(false);
    expect(html).toContain('Some trials are uncalibrated');
    expect(html).toContain('uncalibrated: lengths assume a plateau-middle start');
    const calibrated = await reportHtml(summaries.slice(0, 2));
    expect(calibrated).not.toContain('Some trials are uncalibrated');
    expect(calibrated).not.toContain('uncalibrated: lengths assume');
  });

  it('draws with no warning from the plotting libraries', () => {
    expect(warnings).toEqual([]);
  });

  it('gives the same bytes for the same summaries', async () => {
    expect(await reportHtml(summaries, { title: 'Invented study <A&B>' })).toBe(html);
  });

  it('assembles the same page from sections drawn elsewhere, under the keys given', async () => {
    const keys = [2, 5, 9];
    const sections = await Promise.all(summaries.map((s, i) => trialSectionsHtml(s, keys[i]!)));
    const assembled = await reportHtml(summaries, { title: 'keyed', keys, sections });
    expect(assembled).toBe(await reportHtml(summaries, { title: 'keyed', keys }));
    expect(assembled).toContain('href="#trial-9-calf"');
    expect(assembled).toContain('id="trial-9-calf"');
    // A missing section is drawn here.
    expect(await reportHtml(summaries, { title: 'keyed', keys, sections: [sections[0], undefined, sections[2]] })).toBe(assembled);
  });

  it('makes a valid page with nothing to plot for no trials', async () => {
    const empty = checkHtml(await reportHtml([]));
    expect(empty.doctype).toBe(true);
    expect(empty.problems).toEqual([]);
    expect(empty.elements.filter((e) => e.name === 'svg')).toHaveLength(0);
  });

  it('keeps going for a muscle with no complete stride, saying what is missing', async () => {
    const bare = structuredClone(summaries[0]!);
    const m = bare.muscles.calf!;
    m.strides = [];
    m.cycle = null;
    m.trial = { ...m.trial, stride_count: 0, strides_used: 0, sl_min_um: null, sl_max_um: null, sl_mean_um: null, sl_p5_um: null, sl_p95_um: null };
    const text = await reportHtml([bare]);
    expect(checkHtml(text).problems).toEqual([]);
    expect(text).toContain('No gait-cycle curve');
    expect(text).toContain('No complete stride.');
  });

  it('is written to a file whole, and says when it cannot be', async () => {
    const path = join(folder.dir, 'out', 'report.html');
    expect(await writeReport(path, summaries.slice(0, 1))).toEqual({ ok: true, path });
    expect((await readFile(path, 'utf8')).startsWith('<!DOCTYPE html>')).toBe(true);
    const blocked = await writeReport(join(path, 'inside-a-file.html'), summaries.slice(0, 1));
    expect(blocked.ok).toBe(false);
  });
});
