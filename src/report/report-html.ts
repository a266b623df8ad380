/**
 * The HTML report: one self-contained page (styles and SVG plots inline; no script, font, image or style
 * sheet is fetched, so it opens offline) over one or many trials. For each trial × muscle: the force–length
 * curve with the time at each length over it, sarcomere length over the gait cycle, per-stride ranges; at
 * the top, study overviews and a summary table. Every figure comes from the trials' summary JSON.
 */
import { basename } from 'node:path';
import { REGION_KEYS, REGION_LABEL, type RegionKey } from '../model/regions.ts';
import type { ForceLengthCurve } from '../model/geometry.ts';
import { ARCHITECTURE_PRIOR_CAUTION, METHOD_LABEL } from '../model/calibration.ts';
import { wholeMuscleShapeNote } from '../model/muscle-model.ts';
import type { MuscleJson, SummaryJson } from '../output/summary-json.ts';
import { REGION_COLOUR } from './colours.ts';
import { escapeHtml, htmlPage } from './html-page.ts';
import { curveOf, cycleRows, lengthDomain, strideRows, timeAtLength, toeOffPercent } from './plot-data.ts';
import { cycleSpec, forceLengthSpec, rangeOverviewSpec, regionShareSpec, strideSpec, type OverviewRow } from './plot-specs.ts';
import { renderSvg } from './render-svg.ts';

export interface ReportOptions {
  /** @default 'lengthwise report' */
  readonly title?: string;
  /** Receives the plotting libraries' warnings, if any (a spec they had to adjust); they are never printed. */
  readonly warnings?: string[];
  /**
   * Each summary's key in the page's anchors (`trial-KEY-MUSCLE`), e.g. its place among the files given.
   * @default 1, 2, 3, … in the summaries' order
   */
  readonly keys?: readonly number[];
  /**
   * Each summary's sections, already drawn by trialSectionsHtml with the same key (worker threads draw
   * them in parallel); drawn here when not given.
   */
  readonly sections?: readonly (string | undefined)[];
}

/** Bin width of the time-at-length bars (µm). */
export const TIME_BIN_UM = 0.02;

function um(x: number | null | undefined, digits = 2): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(digits);
}

function pct(x: number | null | undefined): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '—' : `${(100 * x).toFixed(0)}%`;
}

/** One trial × muscle of the report, with what its heading and table row say. */
interface Entry {
  readonly id: string;
  readonly summary: SummaryJson;
  readonly muscle: string;
  readonly m: MuscleJson;
  readonly label: string;
  readonly curve: ForceLengthCurve;
  readonly curveNote: string | null;
  readonly ownFilaments: boolean;
  readonly flags: string[];
}

function trialName(s: SummaryJson): string {
  return s.trial ?? basename(s.source);
}

function flagsOf(s: SummaryJson, m: MuscleJson): string[] {
  const flags: string[] = [];
  if (m.calibration_source === null || m.calibration_source === 'baseline') flags.push('uncalibrated: lengths assume a plateau-middle start');
  if (m.side_source === 'assumed') flags.push('side assumed from the first foot strike');
  if (m.segmentation === 'estimated') {
    flags.push('strides estimated from the fascicle signal: each starts at the fascicle-length minimum, not at a foot strike (0 % of the cycle)');
  }
  // Newer summaries only: each key is absent in older ones.
  if (m.calibration_method === METHOD_LABEL.architecture_prior) flags.push(`${METHOD_LABEL.architecture_prior}: ${ARCHITECTURE_PRIOR_CAUTION}`);
  if (m.activation != null) {
    flags.push(`optimal length shifts with activation (λ ${m.activation.shift}; activation ${m.activation.assumed} where samples carry none): force moves, regions stay`);
  }
  const shapeNote = m.shape === undefined ? null : wholeMuscleShapeNote(m.shape);
  if (shapeNote !== null) flags.push(shapeNote);
  const flagged = m.trial.flagged_count ?? m.strides.filter((x) => x.flagged === true).length;
  if (flagged > 0) flags.push(`${flagged} stride${flagged === 1 ? '' : 's'} flagged for gaps and left out`);
  if (!s.ended) flags.push('trial stopped before its end');
  return flags;
}

/** The anchor of a trial × muscle section. */
export function entryId(key: number, muscle: string): string {
  return `trial-${key}-${muscle.replace(/[^A-Za-z0-9_-]/g, '_')}`;
}

function trialEntries(summary: SummaryJson, key: number): Entry[] {
  return Object.entries(summary.muscles).map(([muscle, m]) => {
    const { curve, note, ownFilaments } = curveOf(m);
    const label = `${summary.subject ?? '—'} · ${trialName(summary)} · ${muscle}${m.side !== null ? ` (${m.side})` : ''}`;
    return { id: entryId(key, muscle), summary, muscle, m, label, curve, curveNote: note, ownFilaments, flags: flagsOf(summary, m) };
  });
}

function mainRegion(fraction: Readonly<Record<RegionKey, number>>): RegionKey {
  return REGION_KEYS.reduce((a, b) => (fraction[b] > fraction[a] ? b : a));
}

function figure(svg: string, caption: string, kind: string, wide = false): string {
  return `<figure class="plot${wide ? ' wide' : ''}" data-plot="${kind}">${svg}<figcaption>${caption}</figcaption></figure>`;
}

async function entrySection(e: Entry, warnings: string[]): Promise<string> {
  const t = e.m.trial;
  const time = timeAtLength(e.m, e.curve, TIME_BIN_UM);
  const cycle = cycleRows(e.m.cycle);
  const strides = strideRows(e.m);
  const domain = lengthDomain(
    [t.sl_min_um, t.sl_max_um, ...cycle.flatMap((r) => [r.lowUm, r.highUm]), ...strides.flatMap((r) => [r.minUm, r.maxUm])],
    e.curve,
  );
  const timeCaption =
    time.method === 'measured'
      ? 'Force–length curve (line, left axis) with the share of time spent at each length over the unflagged strides (bars, right axis); dashed: 5th percentile, mean, 95th percentile.'
      : time.method === 'cycle'
      ? 'Force–length curve (line, left axis) with the share of time at each length (bars, right axis), estimated from the gait-cycle mean ± SD; dashed: 5th percentile, mean, 95th percentile.'
      : time.method === 'regions'
        ? "Force–length curve (line, left axis) with each region's exact share of time spread over the lengths it covered (bars, right axis; no gait-cycle curve in this summary)."
        : 'Force–length curve; no lengths to show the time at.';
  const plots: string[] = [
    figure(
      await renderSvg(
        forceLengthSpec({ curve: e.curve, time, p5Um: t.sl_p5_um ?? null, meanUm: t.sl_mean_um, p95Um: t.sl_p95_um ?? null, binUm: TIME_BIN_UM }),
        `${e.label}: force–length curve and time at each sarcomere length`,
        warnings,
      ),
      timeCaption,
      'force-length',
    ),
  ];
  if (cycle.length > 0) {
    plots.push(
      figure(
        await renderSvg(
          cycleSpec({ curve: e.curve, rows: cycle, domainUm: domain, toeOffPercent: toeOffPercent(e.m) }),
          `${e.label}: sarcomere length over the gait cycle`,
          warnings,
        ),
        `Sarcomere length over the gait cycle: mean (line) ± SD (band) of ${e.m.cycle?.stride_count ?? 0} strides, regions shaded behind.`,
        'cycle',
      ),
    );
  } else plots.push(`<figure class="plot missing" data-plot="cycle"><p>No gait-cycle curve: the trial has no complete stride.</p></figure>`);
  if (strides.length > 0) {
    plots.push(
      figure(
        await renderSvg(strideSpec({ curve: e.curve, rows: strides, domainUm: domain }), `${e.label}: sarcomere length range of each stride`, warnings),
        'Each stride: shortest to longest length (thin line), 5th–95th percentile (bar), mean (tick); strides flagged for gaps in orange.',
        'strides',
      ),
    );
  } else plots.push(`<figure class="plot missing" data-plot="strides"><p>No complete stride.</p></figure>`);

  const main = mainRegion(t.region_fraction);
  const facts = [
    `${t.strides_used ?? t.stride_count} of ${t.stride_count} strides`,
    `SL ${um(t.sl_min_um)}–${um(t.sl_max_um)} µm`,
    `5th–95th percentile ${um(t.sl_p5_um)}–${um(t.sl_p95_um)} µm`,
    `mean ${um(t.sl_mean_um)} µm`,
    `mostly ${REGION_LABEL[main]} (${pct(t.region_fraction[main])})`,
    `mean relative force ${um(t.force_mean)}`,
  ];
  const flags = [...e.flags, ...(e.curveNote !== null ? [e.curveNote] : [])];
  return [
    `<section class="entry" id="${e.id}">`,
    `<h2>${escapeHtml(e.label)}</h2>`,
    `<p class="source">${escapeHtml(e.summary.source)} · curve from ${escapeHtml(e.m.species)} filament geometry${e.ownFilaments ? " with the muscle's own lengths" : ''}</p>`,
    flags.length > 0 ? `<p class="flags">${flags.map((f) => `<span class="flag">${escapeHtml(f)}</span>`).join(' ')}</p>` : '',
    `<p class="facts">${facts.map(escapeHtml).join(' · ')}</p>`,
    `<div class="plots">${plots.join('')}</div>`,
    '</section>',
  ].join('\n');
}

/** Short column labels of the regions for the summary table. */
const REGION_SHORT: Readonly<Record<RegionKey, string>> = {
  too_short: 'too short',
  steep_ascending: 'steep asc.',
  shallow_ascending: 'shallow asc.',
  plateau: 'plateau',
  descending: 'descending',
  no_overlap: 'no overlap',
};

function summaryTable(list: readonly Entry[]): string {
  // Regions no muscle reached are left out of the table (the study CSV has them all).
  const regions = REGION_KEYS.filter((k) => list.some((e) => e.m.trial.region_fraction[k] > 0));
  const head = ['subject', 'trial', 'muscle', 'side', 'strides', 'SL min', 'p5', 'mean', 'p95', 'SL max', ...regions.map((k) => REGION_SHORT[k]), 'force', 'flags'];
  const numeric = new Set(head.slice(4, head.length - 1));
  const rows = list.map((e) => {
    const t = e.m.trial;
    const cells = [
      escapeHtml(e.summary.subject ?? '—'),
      escapeHtml(trialName(e.summary)),
      `<a href="#${e.id}">${escapeHtml(e.muscle)}</a>`,
      escapeHtml(e.m.side ?? '—'),
      `${t.strides_used ?? t.stride_count} / ${t.stride_count}`,
      um(t.sl_min_um),
      um(t.sl_p5_um),
      um(t.sl_mean_um),
      um(t.sl_p95_um),
      um(t.sl_max_um),
      ...regions.map((k) => pct(t.region_fraction[k])),
      um(t.force_mean),
      e.flags.length > 0 ? `<span class="flag-count" title="${escapeHtml(e.flags.join('; '))}">${e.flags.length}</span>` : '',
    ];
    return `<tr>${cells.map((c, i) => `<td${numeric.has(head[i] as string) ? ' class="num"' : ''}>${c}</td>`).join('')}</tr>`;
  });
  return [
    `<table class="summary"><thead><tr>${head.map((h) => `<th>${escapeHtml(h)}</th>`).join('')}</tr></thead><tbody>`,
    ...rows,
    '</tbody></table>',
    '<p class="note">Sarcomere lengths in µm; strides: used / all (flagged strides are left out of the figures); regions: share of stride time; force: mean relative active force from length alone. Every column of every trial is in the study table (CSV).</p>',
  ].join('\n');
}

function legend(): string {
  return `<p class="legend">${REGION_KEYS.map((k) => `<span class="swatch" style="background:${REGION_COLOUR[k]}"></span>${escapeHtml(REGION_LABEL[k])}`).join(' ')}</p>`;
}

function overviewRows(list: readonly Entry[]): OverviewRow[] {
  return list.map((e) => ({
    label: e.label,
    regionFraction: e.m.trial.region_fraction,
    minUm: e.m.trial.sl_min_um,
    p5Um: e.m.trial.sl_p5_um ?? null,
    meanUm: e.m.trial.sl_mean_um,
    p95Um: e.m.trial.sl_p95_um ?? null,
    maxUm: e.m.trial.sl_max_um,
  }));
}

const STYLE = `
:root { color-scheme: light; }
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, Helvetica, Arial, sans-serif; color: #23262b; background: #f7f8fa; margin: 0; padding: 24px 32px; line-height: 1.4; }
h1 { font-size: 22px; margin: 0 0 4px; }
h2 { font-size: 16px; margin: 0 0 2px; }
header p, .source, figcaption, .note { color: #5d636c; font-size: 13px; }
section { background: #fff; border: 1px solid #dfe2e6; border-radius: 6px; padding: 16px 20px; margin: 16px 0; }
.plots { display: flex; flex-wrap: wrap; gap: 12px 20px; }
figure.plot { margin: 0; max-width: 460px; }
figure.wide { max-width: none; }
figure.plot svg { max-width: 100%; height: auto; }
figure.missing p { color: #5d636c; font-style: italic; }
.facts { font-size: 14px; margin: 6px 0 10px; }
table.summary .flag-count { display: inline-block; min-width: 16px; text-align: center; background: #fbeee4; color: #8a3b12; border-radius: 8px; font-size: 11px; cursor: help; }
.flag { display: inline-block; background: #fbeee4; color: #8a3b12; border: 1px solid #efc8ad; border-radius: 3px; padding: 1px 6px; font-size: 12px; margin: 2px 4px 2px 0; }
.legend { font-size: 13px; }
.swatch { display: inline-block; width: 12px; height: 12px; border-radius: 2px; margin: 0 4px -1px 10px; }
table.summary { border-collapse: collapse; font-size: 12px; width: 100%; overflow-x: auto; display: block; }
table.summary th, table.summary td { border-bottom: 1px solid #e6e8eb; padding: 4px 6px; text-align: left; white-space: nowrap; }
table.summary th { background: #f0f2f5; font-weight: 600; }
table.summary td.num { text-align: right; font-variant-numeric: tabular-nums; }
a { color: #2b3f6b; }
@media print { body { background: #fff; padding: 0; } section { break-inside: avoid; border: none; } }
`;

/** The sections of one trial's muscles, each with its three plots; `key` as in ReportOptions.keys. */
export async function trialSectionsHtml(summary: SummaryJson, key: number, warnings: string[] = []): Promise<string> {
  const sections: string[] = [];
  for (const e of trialEntries(summary, key)) sections.push(await entrySection(e, warnings));
  return sections.join('\n');
}

/** The whole report as an HTML document (deterministic: the same summaries give the same bytes). */
export async function reportHtml(summaries: readonly SummaryJson[], options: ReportOptions = {}): Promise<string> {
  const title = options.title ?? 'lengthwise report';
  const warnings = options.warnings ?? [];
  const keys = summaries.map((_, i) => options.keys?.[i] ?? i + 1);
  const list = summaries.flatMap((s, i) => trialEntries(s, keys[i] as number));
  const sections: string[] = [];
  for (let i = 0; i < summaries.length; i++) {
    const ready = options.sections?.[i];
    sections.push(ready ?? (await trialSectionsHtml(summaries[i] as SummaryJson, keys[i] as number, warnings)));
  }
  const species = new Set(list.map((e) => e.m.species));
  const shared = list[0] !== undefined && species.size === 1 ? list[0].curve : null;
  const rows = overviewRows(list);
  const overview =
    list.length === 0
      ? '<p class="note">No trial was summarized, so there is nothing to plot.</p>'
      : [
          '<div class="plots">',
          figure(await renderSvg(regionShareSpec(rows), 'share of time in each region, per trial and muscle', warnings), 'Share of stride time in each region of the force–length curve.', 'overview-regions', true),
          figure(
            await renderSvg(rangeOverviewSpec(rows, shared), 'operating range of sarcomere length, per trial and muscle', warnings),
            `Operating range: min–max (line), 5th–95th percentile (bar), mean (dot)${shared !== null ? '; regions of the shared curve shaded' : ''}.`,
            'overview-ranges',
            true,
          ),
          '</div>',
          summaryTable(list),
        ].join('\n');
  const uncalibrated = summaries.some((s) => !s.calibrated);
  return htmlPage(title, STYLE, [
    '<header>',
    `<h1>${escapeHtml(title)}</h1>`,
    `<p>${summaries.length} trial${summaries.length === 1 ? '' : 's'}, ${list.length} muscle${list.length === 1 ? '' : 's'}. Sarcomere lengths are estimates from each trial's calibration; regions come from the species' filament geometry.${uncalibrated ? ' <strong>Some trials are uncalibrated</strong>: their lengths assume each muscle starts at its plateau middle.' : ''}</p>`,
    legend(),
    '</header>',
    `<section id="overview"><h2>Overview</h2>\n${overview}\n</section>`,
    ...sections,
    '<p class="note">Made by lengthwise from the trials\' summaries. A research tool, not a medical device.</p>',
  ]);
}
