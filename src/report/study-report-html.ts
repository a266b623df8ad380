/**
 * The study report: one self-contained page (styles and SVG figures inline, nothing fetched, so it opens
 * offline) drawn from a study's table rows and provenance, laid out as a paper reads: methods written
 * from the provenance, the figures (operating range and time in each region per condition, gait-cycle
 * curves of the conditions overlaid, paired differences), the tables of group values and comparisons,
 * and the provenance in full. Every number comes from the input; nothing is computed across subjects here.
 */
import { REGION_KEYS, type RegionKey } from '../model/regions.ts';
import type { ComparisonRow } from '../output/study-rows.ts';
import { methodsParagraphs, studyFacts } from './methods-text.ts';
import { settingPhrases } from './setting-words.ts';
import { escapeHtml, htmlPage } from './html-page.ts';
import { figureHtml, figureWidthStyle, type StudyFigure } from './study-figure-html.ts';
import {
  anyStridesEstimated,
  conditionsOf,
  cyclePoints,
  differenceRows,
  figureLabel,
  GroupIndex,
  isTrue,
  LENGTH_DIFFERENCE_FIGURES,
  muscleCurve,
  musclesOf,
  pairLabel,
  pairsOf,
  RANGE_FIGURES,
  rangeRows,
  regionFigure,
  regionShareRows,
  regionsReached,
  trialValues,
} from './study-plot-data.ts';
import { cycleFigureSpec, differenceFigureSpec, rangeFigureSpec, regionShareFigureSpec, type DifferencePanel } from './study-plot-specs.ts';
import type { StudyReportInput } from './study-report-input.ts';

export interface StudyReportOptions {
  /** Receives the plotting libraries' warnings, if any (a spec they had to adjust); they are never printed. */
  readonly warnings?: string[];
}

/** Everything the page's parts share: the study's order of conditions and muscles, the group index. */
interface Study {
  readonly input: StudyReportInput;
  readonly conditions: readonly string[];
  readonly muscles: readonly string[];
  readonly pairs: readonly string[];
  readonly index: GroupIndex;
  /** Regions any muscle spent time in, in any condition. */
  readonly regions: readonly RegionKey[];
}

function studyOf(input: StudyReportInput): Study {
  const conditions = conditionsOf(input.groups, input.cycles, input.comparisons);
  const muscles = musclesOf(input.groups, input.cycles, input.comparisons);
  const index = new GroupIndex(input.groups);
  const regions = REGION_KEYS.filter((k) => muscles.some((m) => regionsReached(index, m, conditions).includes(k)));
  return { input, conditions, muscles, pairs: pairsOf(input.comparisons), index, regions };
}

/** A muscle's name with its side when every trial agrees on one. */
function muscleTitle(study: Study, muscle: string): string {
  const sides = trialValues(study.input.trials, muscle, 'side');
  return sides.length === 1 ? `${muscle} (${sides[0] as string})` : muscle;
}

function nSubjects(study: Study, figures: readonly string[], muscles: readonly string[] = study.muscles): string {
  const ns = study.input.groups.filter((g) => figures.includes(g.figure) && muscles.includes(g.muscle)).map((g) => g.n_subjects);
  if (ns.length === 0) return 'no subjects';
  const lo = Math.min(...ns);
  const hi = Math.max(...ns);
  return `n = ${lo === hi ? lo : `${lo}–${hi}`} subjects`;
}

/** What the shaded regions are, for a caption. */
function regionsNote(study: Study, muscles: readonly string[]): string {
  const species = [...new Set(muscles.map((m) => muscleCurve(study.input.trials, m)?.species ?? null))];
  if (species.includes(null)) return "Regions are shaded only where a muscle's trials name one species the report knows.";
  return `Regions of the ${species.join(' and ')} force–length curve (from filament geometry) shaded behind.`;
}

function rangeFigure(study: Study, number: number): StudyFigure {
  const panels = study.muscles.map((muscle) => ({
    muscle,
    title: muscleTitle(study, muscle),
    rows: rangeRows(study.index, muscle, study.conditions),
    curve: muscleCurve(study.input.trials, muscle)?.curve ?? null,
  }));
  return {
    number,
    kind: 'operating-range',
    label: 'Operating range of sarcomere length per condition, one panel per muscle',
    caption:
      `Operating range of sarcomere length in each condition (${nSubjects(study, Object.values(RANGE_FIGURES))}). ` +
      "Bar: group mean of the subjects' 5th to 95th percentile; whiskers at its ends: the 95 % confidence interval of each end across subjects; " +
      'thin grey line: group mean of the shortest to the longest length; dot: group mean length, with its 95 % confidence interval in black. ' +
      regionsNote(study, study.muscles),
    spec: (widthPx) => rangeFigureSpec({ panels, conditions: study.conditions, widthPx }),
  };
}

function regionShareFigure(study: Study, number: number): StudyFigure {
  const panels = study.muscles.map((muscle) => ({ muscle, title: muscleTitle(study, muscle), rows: regionShareRows(study.index, muscle, study.conditions), curve: null }));
  return {
    number,
    kind: 'time-in-regions',
    label: 'Time in each region of the force–length curve per condition, one panel per muscle',
    caption:
      `Time in each region of the force–length curve in each condition: group means of the subjects' time fractions (${nSubjects(study, study.regions.map(regionFigure))}), ` +
      'stacked to 100 % of stride time; shares of 8 % or more are written in. Their 95 % confidence intervals are in Table 1.',
    spec: (widthPx) => regionShareFigureSpec({ panels, conditions: study.conditions, regions: study.regions, widthPx }),
  };
}

function cycleFigure(study: Study, muscle: string, number: number): StudyFigure {
  const points = cyclePoints(study.input.cycles, muscle, study.conditions);
  const rows = study.input.trials.filter((t) => t['muscle'] === muscle && !isTrue(t['exclude']));
  const estimated = rows.filter((t) => isTrue(t['segmentation_estimated'])).length;
  const allEstimated = estimated > 0 && estimated === rows.length;
  const start = allEstimated ? 'the shortest fascicle length' : 'foot strike';
  const startNote = allEstimated
    ? "Every stride was estimated from the fascicle signal: 0 % is the cycle's shortest fascicle length, not a foot strike."
    : anyStridesEstimated(rows, muscle)
      ? `0 % is the foot strike of the muscle's side, except in ${estimated} of ${rows.length} trials whose strides were estimated from the fascicle signal and start at its shortest length: ` +
        'their curves are averaged in, so read the timing of these curves with care.'
      : "0 % is the foot strike of the muscle's side.";
  const curve = muscleCurve(study.input.trials, muscle)?.curve ?? null;
  const title = muscleTitle(study, muscle);
  return {
    number,
    kind: `cycle-${muscle}`,
    label: `${title}: sarcomere length over the gait cycle, conditions overlaid`,
    caption:
      `${title}: sarcomere length over the gait cycle in each condition, group mean (line) ± SD across subjects (band) of each subject's mean curve ` +
      `(${nSubjects(study, [RANGE_FIGURES.mean], [muscle])}). ${startNote} ${regionsNote(study, [muscle])}`,
    spec: (widthPx) => cycleFigureSpec({ title, points, conditions: study.conditions, curve, cycleStart: start, widthPx }),
  };
}

function differencePanels(study: Study): DifferencePanel[] {
  const panels: DifferencePanel[] = [];
  for (const muscle of study.muscles) {
    const title = muscleTitle(study, muscle);
    const lengths = differenceRows(study.input.comparisons, muscle, LENGTH_DIFFERENCE_FIGURES, study.pairs);
    if (lengths.length > 0) panels.push({ title: `${title}: sarcomere length`, rows: lengths, axisTitle: 'difference, b − a (µm)' });
    const regions = regionsReached(study.index, muscle, study.conditions).map(regionFigure);
    const shares = differenceRows(study.input.comparisons, muscle, regions, study.pairs, 100);
    if (shares.length > 0) panels.push({ title: `${title}: time in each region`, rows: shares, axisTitle: 'difference, b − a (percentage points of stride time)' });
  }
  return panels;
}

function differenceFigure(study: Study, number: number): StudyFigure {
  const panels = differencePanels(study);
  const ns = study.input.comparisons.map((c) => c.n_pairs);
  const n = ns.length === 0 ? '' : ` (n = ${Math.min(...ns) === Math.max(...ns) ? Math.min(...ns) : `${Math.min(...ns)}–${Math.max(...ns)}`} subjects with both)`;
  return {
    number,
    kind: 'paired-differences',
    label: 'Paired differences between conditions with their 95 % confidence intervals',
    caption:
      `Paired differences between conditions, b − a, over the subjects who had both${n}: mean difference (point) with its 95 % confidence interval (whiskers); ` +
      'sarcomere length figures in µm, time in each region in percentage points of stride time. The dashed line marks no difference; t, p and dz are in Table 2.',
    spec: (widthPx) => differenceFigureSpec({ panels, pairs: study.pairs, widthPx }),
  };
}

/** A number for a table, with a true minus sign as the figures' axes write it; a dash when not known. */
function fixed(x: number | null | undefined, digits: number): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  const text = x.toFixed(digits);
  return /^-0\.?0*$/.test(text) ? text.slice(1) : text.replace(/^-/, '−');
}

/**
 * A figure's value in its unit for the tables: lengths in µm (3 decimals), fractions in % (1 decimal),
 * and a difference of fractions in percentage points.
 */
function tableValue(figure: string, difference = false): { readonly scale: number; readonly digits: number; readonly unit: string } {
  if (figure.endsWith('_um')) return { scale: 1, digits: 3, unit: 'µm' };
  if (figure.endsWith('_fraction')) return { scale: 100, digits: 1, unit: difference ? 'percentage points' : '% of stride time' };
  return { scale: 1, digits: 3, unit: '' };
}

/** The figures the tables list, for a muscle: lengths, then the regions it reached, then its mean force. */
function tableFigures(study: Study, muscle: string): string[] {
  const have = new Set(study.input.groups.filter((g) => g.muscle === muscle).map((g) => g.figure));
  const lengths = ['sl_mean_um', 'sl_p5_um', 'sl_p95_um', 'sl_min_um', 'sl_max_um', 'excursion_um'];
  const regions = regionsReached(study.index, muscle, study.conditions).map(regionFigure);
  return [...lengths, ...regions, 'force_mean'].filter((f) => have.has(f));
}

function figureCell(figure: string, difference = false): string {
  const { unit } = tableValue(figure, difference);
  return `${escapeHtml(figureLabel(figure))}${unit === '' ? '' : ` <span class="unit">(${escapeHtml(unit)})</span>`}`;
}

function groupTable(study: Study): string {
  const head = `<tr><th>muscle</th><th>figure</th>${study.conditions.map((c) => `<th>${escapeHtml(c)}</th>`).join('')}</tr>`;
  const body: string[] = [];
  for (const muscle of study.muscles) {
    const figures = tableFigures(study, muscle);
    const n = study.conditions.map((c) => `<td class="num">${Math.max(0, ...figures.map((f) => study.index.get(c, muscle, f)?.n_subjects ?? 0))}</td>`);
    body.push(`<tr class="first"><th rowspan="${figures.length + 1}">${escapeHtml(muscleTitle(study, muscle))}</th><td>subjects (n)</td>${n.join('')}</tr>`);
    for (const figure of figures) {
      const { scale, digits } = tableValue(figure);
      const cells = study.conditions.map((c) => {
        const g = study.index.get(c, muscle, figure);
        if (g === undefined || g.mean === null) return '<td class="num">—</td>';
        const sd = g.sd === null ? '' : ` ± ${fixed(g.sd * scale, digits)}`;
        const ci = g.ci95_low === null || g.ci95_high === null ? '' : `<br><span class="ci">[${fixed(g.ci95_low * scale, digits)}, ${fixed(g.ci95_high * scale, digits)}]</span>`;
        return `<td class="num">${fixed(g.mean * scale, digits)}${sd}${ci}</td>`;
      });
      body.push(`<tr><td>${figureCell(figure)}</td>${cells.join('')}</tr>`);
    }
  }
  return tableFigure(
    1,
    'Group values per condition: mean ± SD across subjects, with the 95 % confidence interval of the mean below (t distribution, n − 1 degrees of freedom). Each subject counts once, with the mean of its trials. Every figure of every muscle is in groups.csv.',
    valuesTable(head, body.join('')),
  );
}

/** A table of values, scrolling sideways on a narrow page; `head` and `body` are rows of HTML. */
function valuesTable(head: string, body: string): string {
  return `<div class="scroll"><table class="values"><thead>${head}</thead><tbody>${body}</tbody></table></div>`;
}

/** A numbered table with its caption (HTML) above it. */
function tableFigure(number: number, caption: string, table: string): string {
  return [`<figure class="table" id="table-${number}">`, `<figcaption><strong>Table ${number}.</strong> ${caption}</figcaption>`, table, '</figure>'].join('\n');
}

function pValue(p: number | null): string {
  if (p === null || !Number.isFinite(p)) return '—';
  return p < 0.001 ? '&lt; 0.001' : p.toFixed(3);
}

function comparisonTable(study: Study): string {
  const head = '<tr><th>muscle</th><th>figure</th><th>comparison (b − a)</th><th>n</th><th>mean difference [95 % CI]</th><th>t</th><th>p</th><th>dz</th></tr>';
  const body: string[] = [];
  for (const muscle of study.muscles) {
    const figures = tableFigures(study, muscle);
    const rows = study.input.comparisons
      .filter((c) => c.muscle === muscle && figures.includes(c.figure))
      .sort((a, b) => figures.indexOf(a.figure) - figures.indexOf(b.figure) || study.pairs.indexOf(pairLabel(a)) - study.pairs.indexOf(pairLabel(b)));
    rows.forEach((c: ComparisonRow, i) => {
      const { scale, digits } = tableValue(c.figure);
      const ci = c.ci95_low === null || c.ci95_high === null ? '' : ` [${fixed(c.ci95_low * scale, digits)}, ${fixed(c.ci95_high * scale, digits)}]`;
      body.push(
        `<tr${i === 0 ? ' class="first"' : ''}>` +
          (i === 0 ? `<th rowspan="${rows.length}">${escapeHtml(muscleTitle(study, muscle))}</th>` : '') +
          `<td>${figureCell(c.figure, true)}</td><td>${escapeHtml(pairLabel(c))}</td><td class="num">${c.n_pairs}</td>` +
          `<td class="num">${c.mean_diff === null ? '—' : `${fixed(c.mean_diff * scale, digits)}${ci}`}</td>` +
          `<td class="num">${fixed(c.t, 2)}</td><td class="num">${pValue(c.p)}</td><td class="num">${fixed(c.dz, 2)}</td></tr>`,
      );
    });
  }
  return tableFigure(
    2,
    'Paired comparisons between conditions over the subjects who had both: mean difference b − a with its 95 % confidence interval, two-sided paired t-test (t, p) and effect size dz (mean difference / SD of the differences). Time in a region in percentage points of stride time. Every figure is in comparisons.csv.',
    valuesTable(head, body.join('')),
  );
}

function provenanceSection(input: StudyReportInput): string {
  const p = input.provenance;
  const settings = settingPhrases(p.settings)
    .map((s) => `<tr><td><code>${escapeHtml(s.key)}</code></td><td>${escapeHtml(s.value)}</td></tr>`)
    .join('');
  const calibration = p.calibration
    .map(
      (c) =>
        `<tr><td>${escapeHtml(c.subject ?? 'every subject')}</td><td>${escapeHtml(c.muscle)}</td><td>${escapeHtml(c.method ?? '—')}</td><td>${escapeHtml(c.source ?? '—')}</td>` +
        `<td>${escapeHtml([c.provenance?.method, c.provenance?.sarcomere_length_source].filter((x) => x !== undefined).join('; '))}</td></tr>`,
    )
    .join('');
  const inputs = p.inputs
    .map((f) => `<tr><td><code>${escapeHtml(f.path)}</code></td><td>${escapeHtml(f.kind ?? '')}</td><td class="num">${f.bytes}</td><td><code class="hash">${escapeHtml(f.sha256)}</code></td></tr>`)
    .join('');
  const markers = input.markers ?? [];
  return [
    '<section id="provenance">',
    '<h2>Provenance</h2>',
    `<p>Made by ${escapeHtml(p.tool)} ${escapeHtml(p.version)} at ${escapeHtml(p.created_utc)} (UTC). The same inputs and settings give the same tables.</p>`,
    '<h3>Settings</h3>',
    settings === '' ? '<p class="note">No settings recorded.</p>' : valuesTable('<tr><th>key</th><th>value</th></tr>', settings),
    '<h3>Calibration per subject and muscle</h3>',
    calibration === ''
      ? '<p class="note">No calibration recorded.</p>'
      : valuesTable('<tr><th>subject</th><th>muscle</th><th>method</th><th>source</th><th>how</th></tr>', calibration),
    '<h3>Input files</h3>',
    inputs === ''
      ? '<p class="note">No input files recorded.</p>'
      : valuesTable('<tr><th>path</th><th>kind</th><th>bytes</th><th>SHA-256</th></tr>', inputs),
    ...(markers.length === 0
      ? []
      : [
          '<h3>Markers</h3>',
          valuesTable(
            '<tr><th>subject</th><th>condition</th><th>trial</th><th>time (s)</th><th>text</th></tr>',
            markers
              .map(
                (m) =>
                  `<tr><td>${escapeHtml(m.subject)}</td><td>${escapeHtml(m.condition)}</td><td>${escapeHtml(m.trial)}</td><td class="num">${m.time_s}</td><td>${escapeHtml(m.text)}</td></tr>`,
              )
              .join(''),
          ),
        ]),
    '</section>',
  ].join('\n');
}

const STYLE = `
:root { color-scheme: light; }
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, Helvetica, Arial, sans-serif; color: #23262b; background: #f7f8fa; margin: 0; padding: 24px 32px; line-height: 1.45; }
h1 { font-size: 24px; margin: 0 0 4px; }
h2 { font-size: 18px; margin: 0 0 8px; }
h3 { font-size: 15px; margin: 16px 0 6px; }
header p { color: #4a4f57; font-size: 15px; margin: 4px 0; }
nav { font-size: 14px; margin-top: 6px; }
nav a { margin-right: 14px; }
section { background: #fff; border: 1px solid #dfe2e6; border-radius: 6px; padding: 16px 20px; margin: 16px 0; }
#methods p { font-size: 15px; max-width: 80em; }
.note { color: #5d636c; font-size: 13px; }
figure.study, figure.table { margin: 0 0 28px; }
.renders { overflow-x: auto; }
.render svg { display: block; width: 100%; height: auto; }
figcaption { font-size: 14px; color: #3b3f45; margin-top: 6px; max-width: 80em; }
p.save { font-size: 13px; margin: 4px 0 0; color: #5d636c; }
.scroll { overflow-x: auto; }
table.values { border-collapse: collapse; font-size: 13px; margin-top: 6px; }
table.values th, table.values td { border-bottom: 1px solid #e6e8eb; padding: 4px 8px; text-align: left; vertical-align: top; }
table.values thead th { background: #f0f2f5; font-weight: 600; white-space: nowrap; }
table.values tbody th { font-weight: 600; white-space: nowrap; }
table.values tr.first > * { border-top: 2px solid #c9cdd3; }
table.values td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.ci { color: #5d636c; font-size: 12px; }
.unit { color: #5d636c; }
code.hash { font-size: 11px; word-break: break-all; }
a { color: #2b3f6b; }
${figureWidthStyle()}
@media (max-width: 640px) { body { padding: 12px 8px; } section { padding: 12px 10px; } }
@media print { body { background: #fff; padding: 0; } section { border: none; } figure { break-inside: avoid; } p.save, nav { display: none; } }
`;

/**
 * The study report as an HTML document, from the study's rows and provenance (deterministic: the same
 * input gives the same bytes).
 */
export async function studyReportHtml(input: StudyReportInput, options: StudyReportOptions = {}): Promise<string> {
  const warnings = options.warnings ?? [];
  const study = studyOf(input);
  const title = input.title ?? 'lengthwise study report';
  const figures: StudyFigure[] = [];
  if (study.muscles.length > 0 && study.conditions.length > 0) {
    figures.push(rangeFigure(study, figures.length + 1));
    figures.push(regionShareFigure(study, figures.length + 1));
    for (const muscle of study.muscles) if (cyclePoints(input.cycles, muscle, study.conditions).length > 0) figures.push(cycleFigure(study, muscle, figures.length + 1));
    if (study.pairs.length > 0 && differencePanels(study).length > 0) figures.push(differenceFigure(study, figures.length + 1));
  }
  const drawn: string[] = [];
  for (const f of figures) drawn.push(await figureHtml(f, warnings));
  const facts = studyFacts(input.trials);
  const subjects = facts.subjects.length;
  const trials = `${facts.trials} trial${facts.trials === 1 ? '' : 's'}${facts.excludedTrials > 0 ? ` (and ${facts.excludedTrials} excluded)` : ''}`;
  const p = input.provenance;
  return htmlPage(title, STYLE, [
    '<header>',
    `<h1>${escapeHtml(title)}</h1>`,
    `<p>${subjects} subject${subjects === 1 ? '' : 's'} · ${study.conditions.length} condition${study.conditions.length === 1 ? '' : 's'} (${study.conditions.map(escapeHtml).join(', ')}) · ` +
      `${study.muscles.length} muscle${study.muscles.length === 1 ? '' : 's'} · ${trials}. Made by ${escapeHtml(p.tool)} ${escapeHtml(p.version)} at ${escapeHtml(p.created_utc)} (UTC).</p>`,
    `<nav><a href="#methods">Methods</a><a href="#results">Figures</a><a href="#tables">Tables</a><a href="#provenance">Provenance</a></nav>`,
    '</header>',
    '<section id="methods">',
    '<h2>Methods</h2>',
    ...methodsParagraphs(input).map((para) => `<p><strong>${escapeHtml(para.heading)}.</strong> ${escapeHtml(para.text)}</p>`),
    "<p class=\"note\">Written from this study's provenance and tables: adapt the wording for a paper; the numbers are this study's.</p>",
    '</section>',
    '<section id="results">',
    '<h2>Figures</h2>',
    drawn.length === 0 ? '<p class="note">The study has no group rows to draw.</p>' : drawn.join('\n'),
    '</section>',
    '<section id="tables">',
    '<h2>Tables</h2>',
    study.muscles.length > 0 ? groupTable(study) : '<p class="note">The study has no group values.</p>',
    study.input.comparisons.length > 0 ? comparisonTable(study) : '<p class="note">No pair of conditions to compare.</p>',
    '</section>',
    provenanceSection(input),
    '<p class="note">Made by lengthwise from the study\'s tables. Sarcomere lengths are estimates from each calibration. A research tool, not a medical device.</p>',
  ]);
}
