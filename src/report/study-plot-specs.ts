/**
 * The study report's figures as vega-lite specs, each for a given overall width in pixels (the page
 * draws each figure at a few widths and shows the one that fits): operating range per condition, time
 * in each region per condition, gait-cycle curves of the conditions overlaid, and paired differences.
 * Text is at least 12 px; every figure carries its own legend. Data are inlined (`values`).
 */
import type { Config } from 'vega';
import type { TopLevelSpec } from 'vega-lite';
import type { ForceLengthCurve } from '../model/geometry.ts';
import { REGION_KEYS, REGION_LABEL, type RegionKey } from '../model/regions.ts';
import { CONDITION_RANGE, INK, MUTED } from './colours.ts';
import { fixedScale, regionBandLayer, regionColour } from './plot-specs.ts';
import { PLOT_CONFIG } from './render-svg.ts';
import { figureLabel, type CyclePoint, type DifferenceRow, type RangeRow, type RegionShareRow } from './study-plot-data.ts';

/** The smallest text anywhere in a study figure (px). */
export const STUDY_TEXT_PX = 12;

/** The shared look with text for a page a paper's figures come from: tick labels and legends at 12 px or more. */
export const STUDY_PLOT_CONFIG = {
  ...PLOT_CONFIG,
  axis: { ...PLOT_CONFIG.axis, labelFontSize: STUDY_TEXT_PX, titleFontSize: STUDY_TEXT_PX + 1, titlePadding: 6 },
  legend: {
    labelFontSize: STUDY_TEXT_PX,
    titleFontSize: STUDY_TEXT_PX + 1,
    labelLimit: 300,
    titleLimit: 400,
    orient: 'bottom',
    direction: 'horizontal',
  },
  title: { ...PLOT_CONFIG.title, fontSize: STUDY_TEXT_PX + 1, fontWeight: 600, offset: 6 },
  concat: { spacing: 22 },
} as const;

/**
 * Vega's own settings on top of the compiled specs: legends at the bottom go one under the other, so
 * that a figure's legends never make it wider than asked (vega-lite's config does not carry this).
 */
export const STUDY_VEGA_CONFIG: Config = { legend: { layout: { bottom: { anchor: 'start', direction: 'vertical', margin: 10 } } } };

/** Vega's own padding around a figure (px, each side). */
const PADDING_PX = 5;
/** Room for the length axis' labels and title, left of a plot (px). */
const LENGTH_AXIS_PX = 62;

/**
 * Width of a text at STUDY_TEXT_PX as the plotting library measures it in Node, where it has no font to
 * measure with: 0.8 font sizes a character (vega's own estimate).
 */
function textWidth(text: string): number {
  return Math.ceil(0.8 * STUDY_TEXT_PX * text.length);
}

/**
 * An axis title that fits `widthPx`: as it is, or in lines broken before its parenthesis and after its
 * commas, and between words where a piece is still too wide (a title wider than its axis would widen the
 * figure).
 */
function fitTitle(title: string, widthPx: number): string | string[] {
  const width = (t: string) => Math.ceil(0.8 * (STUDY_TEXT_PX + 1) * t.length);
  if (width(title) <= widthPx) return title;
  const lines: string[] = [];
  const add = (piece: string, join: boolean) => {
    const last = lines[lines.length - 1];
    if (join && last !== undefined && width(`${last}${piece}`) <= widthPx) lines[lines.length - 1] = `${last}${piece}`;
    else lines.push(piece.trimStart());
  };
  for (const piece of title.split(/(?= \()|(?<=,)(?= )/)) {
    if (width(piece.trim()) <= widthPx) add(piece, true);
    else piece.split(/(?= )/).forEach((word, i) => add(word, i > 0));
  }
  return lines;
}

/** Room the condition names (or other row labels) need at 12 px, within bounds (px); longer names are cut short with "…". */
function labelExtent(labels: readonly string[]): number {
  const longest = labels.reduce((m, l) => Math.max(m, textWidth(l)), 0);
  return Math.min(240, Math.max(60, longest + 12));
}

/** Room right of a plot for half its last tick label, which overhangs the axis' end (px). */
const OVERHANG_PX = 20;

/** The plotting area's width for a figure of `widthPx` overall with `leftPx` of labels left of it. */
function plotWidth(widthPx: number, leftPx: number): number {
  return Math.max(120, Math.round(widthPx - leftPx - 2 * PADDING_PX - OVERHANG_PX));
}

/** A legend's columns so that its entries fit in `widthPx` (each about its label at 12 px plus a symbol). */
function legendColumns(labels: readonly string[], widthPx: number): number {
  const entry = labels.reduce((m, l) => Math.max(m, textWidth(l)), 0) + 34;
  return Math.max(1, Math.min(labels.length, Math.floor(widthPx / entry)));
}

/**
 * A figure's look: the shared one, with its legends' entries in as many columns as fit under the plot
 * (legends at the bottom start where the plot starts) and titles cut to the figure's width
 * (`legendLabels`: every legend's entries).
 */
function figureConfig(widthPx: number, plotWidthPx: number, legendLabels: readonly string[]) {
  return {
    ...STUDY_PLOT_CONFIG,
    legend: { ...STUDY_PLOT_CONFIG.legend, columns: legendColumns(legendLabels, plotWidthPx) },
    title: { ...STUDY_PLOT_CONFIG.title, limit: widthPx - 2 * PADDING_PX },
  };
}

/** The conditions' colour scale, the same in every figure, with its legend (drawn as lines for line plots). */
function conditionColour(conditions: readonly string[], symbol: 'circle' | 'stroke') {
  return {
    field: 'condition',
    type: 'nominal',
    scale: { domain: [...conditions], range: conditions.map((_, i) => CONDITION_RANGE[i % CONDITION_RANGE.length] as string) },
    legend: { title: 'condition', symbolType: symbol, symbolStrokeWidth: 3, symbolOpacity: 1 },
  } as const;
}

function regionLabels(regions: readonly RegionKey[]): string[] {
  return regions.map((k) => REGION_LABEL[k]);
}

/** About one tick per 90 px of axis: labels that never crowd, so none is left out. */
function tickCount(widthPx: number): number {
  return Math.max(4, Math.round(widthPx / 90));
}

/** A length range holding every value, with a little room, rounded out to 0.1 µm. */
function lengthRange(values: readonly (number | null)[]): [number, number] {
  const finite = values.filter((v): v is number => v !== null && Number.isFinite(v));
  if (finite.length === 0) return [2, 3.5];
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  const pad = Math.max(0.05, (hi - lo) * 0.06);
  return [Math.floor((lo - pad) * 10) / 10, Math.ceil((hi + pad) * 10) / 10];
}

/** The regions whose bands show over [lo, hi] on any of the curves. */
function regionsWithin(curves: readonly (ForceLengthCurve | null)[], lo: number, hi: number): RegionKey[] {
  return REGION_KEYS.filter((k) =>
    curves.some((c) => {
      if (c === null) return false;
      const edges = [Number.NEGATIVE_INFINITY, c.steepZeroUm, c.steepBreakUm, c.plateauStartUm, c.plateauEndUm, c.descendingZeroUm, Number.POSITIVE_INFINITY];
      const i = REGION_KEYS.indexOf(k);
      return Math.min(hi, edges[i + 1] as number) > Math.max(lo, edges[i] as number);
    }),
  );
}

/** One muscle's part of a study figure. */
export interface MusclePanel<Row> {
  readonly muscle: string;
  /** The panel's title (the muscle, and its side when known). */
  readonly title: string;
  readonly rows: readonly Row[];
  /** The curve whose regions are shaded; null: none shaded. */
  readonly curve: ForceLengthCurve | null;
}

export interface RangeFigure {
  readonly panels: readonly MusclePanel<RangeRow>[];
  readonly conditions: readonly string[];
  readonly widthPx: number;
}

/**
 * Operating range per condition, a panel per muscle: group-mean 5th–95th percentile (bar) with the 95 %
 * interval of each end (whiskers), group-mean shortest to longest length (thin line), group-mean mean
 * length (dot) with its interval; regions shaded behind.
 */
export function rangeFigureSpec(f: RangeFigure): TopLevelSpec {
  const all = f.panels.flatMap((p) => p.rows);
  const [lo, hi] = lengthRange(all.flatMap((r) => [r.min?.mean ?? null, r.max?.mean ?? null, r.p5?.low ?? null, r.p95?.high ?? null, r.p5?.mean ?? null, r.p95?.mean ?? null]));
  const left = labelExtent(f.conditions);
  const width = plotWidth(f.widthPx, left);
  const x = { ...fixedScale(lo, hi), axis: { tickCount: tickCount(width) } };
  const regions = regionsWithin(
    f.panels.map((p) => p.curve),
    lo,
    hi,
  );
  const y = { field: 'condition', type: 'nominal', title: null, sort: [...f.conditions], axis: { minExtent: left, maxExtent: left, labelLimit: left - 8 } } as const;
  const colour = conditionColour(f.conditions, 'circle');
  const values = (rows: readonly RangeRow[]) =>
    rows.map((r) => ({
      condition: r.condition,
      n: r.nSubjects,
      minUm: r.min?.mean ?? null,
      maxUm: r.max?.mean ?? null,
      p5Um: r.p5?.mean ?? null,
      p5Low: r.p5?.low ?? null,
      p5High: r.p5?.high ?? null,
      p95Um: r.p95?.mean ?? null,
      p95Low: r.p95?.low ?? null,
      p95High: r.p95?.high ?? null,
      meanUm: r.mean?.mean ?? null,
      meanLow: r.mean?.low ?? null,
      meanHigh: r.mean?.high ?? null,
    }));
  const interval = (low: string, high: string, colour: object) => ({
    transform: [{ filter: `isValid(datum.${low}) && isValid(datum.${high})` }],
    mark: { type: 'errorbar', ticks: { size: 10 }, thickness: 1.6 },
    encoding: { y, x: { field: low, type: 'quantitative', ...x, title: null }, x2: { field: high }, ...colour },
  });
  return {
    config: figureConfig(f.widthPx, width, [...f.conditions, ...regionLabels(regions)]),
    vconcat: f.panels.map((p, i) => ({
      title: p.title,
      width,
      height: { step: 34 },
      layer: [
        regionBandLayer(p.curve, lo, hi, 'x', 0.14, { channel: 'fill', legend: regions }),
        {
          data: { values: values(p.rows) },
          layer: [
            {
              transform: [{ filter: 'isValid(datum.minUm) && isValid(datum.maxUm)' }],
              mark: { type: 'rule', color: MUTED, strokeWidth: 1.2 },
              encoding: {
                y,
                x: { field: 'minUm', type: 'quantitative', ...x, title: i === f.panels.length - 1 ? 'sarcomere length (µm)' : null },
                x2: { field: 'maxUm' },
              },
            },
            {
              transform: [{ filter: 'isValid(datum.p5Um) && isValid(datum.p95Um)' }],
              mark: { type: 'rule', strokeWidth: 12, opacity: 0.42 },
              encoding: { y, x: { field: 'p5Um', type: 'quantitative', ...x }, x2: { field: 'p95Um' }, color: colour },
            },
            interval('p5Low', 'p5High', { color: colour }),
            interval('p95Low', 'p95High', { color: colour }),
            interval('meanLow', 'meanHigh', { color: { value: INK } }),
            {
              transform: [{ filter: 'isValid(datum.meanUm)' }],
              mark: { type: 'point', filled: true, size: 60, stroke: '#ffffff', strokeWidth: 1, opacity: 1 },
              encoding: { y, x: { field: 'meanUm', type: 'quantitative', ...x }, color: colour },
            },
          ],
        },
      ],
    })),
    resolve: { scale: { y: 'independent' } },
  } as TopLevelSpec;
}

/** The regions drawn in light hues carry dark text; the others white. */
const LIGHT_REGIONS: ReadonlySet<RegionKey> = new Set(['too_short', 'shallow_ascending']);

export interface RegionShareFigure {
  readonly panels: readonly MusclePanel<RegionShareRow>[];
  readonly conditions: readonly string[];
  /** The regions any muscle spent time in (the legend's entries). */
  readonly regions: readonly RegionKey[];
  readonly widthPx: number;
}

/** Time in each region per condition (group means), stacked to 100 %, a panel per muscle; shares of 8 % or more written in. */
export function regionShareFigureSpec(f: RegionShareFigure): TopLevelSpec {
  const left = labelExtent(f.conditions);
  const width = plotWidth(f.widthPx, left);
  const y = { field: 'condition', type: 'nominal', title: null, sort: [...f.conditions], axis: { minExtent: left, maxExtent: left, labelLimit: left - 8 } } as const;
  const x = { type: 'quantitative', ...fixedScale(0, 100), axis: { tickCount: tickCount(width) } } as const;
  const fill = regionColour(f.regions);
  return {
    config: figureConfig(f.widthPx, width, regionLabels(f.regions)),
    vconcat: f.panels.map((p, i) => ({
      title: p.title,
      width,
      height: { step: 30 },
      data: {
        values: p.rows.map((r) => ({ condition: r.condition, region: r.region, k: REGION_KEYS.indexOf(r.region), percent: r.percent, ink: LIGHT_REGIONS.has(r.region) ? INK : '#ffffff' })),
      },
      transform: [
        { stack: 'percent', groupby: ['condition'], sort: [{ field: 'k', order: 'ascending' }], as: ['from', 'to'] },
        { calculate: '(datum.from + datum.to) / 2', as: 'middle' },
      ],
      layer: [
        {
          mark: { type: 'bar', stroke: '#ffffff', strokeWidth: 0.5 },
          encoding: {
            y,
            x: { field: 'from', ...x, title: i === f.panels.length - 1 ? fitTitle('time in each region (% of stride time, group mean)', width) : null },
            x2: { field: 'to' },
            fill,
          },
        },
        {
          transform: [{ filter: 'datum.percent >= 8' }],
          mark: { type: 'text', fontSize: STUDY_TEXT_PX, baseline: 'middle', align: 'center' },
          encoding: { y, x: { field: 'middle', ...x }, text: { field: 'percent', type: 'quantitative', format: '.0f' }, color: { field: 'ink', type: 'nominal', scale: null } },
        },
      ],
    })),
    resolve: { scale: { y: 'independent' } },
  } as TopLevelSpec;
}

export interface CycleFigure {
  /** The figure's title (the muscle, and its side when known). */
  readonly title: string;
  readonly points: readonly CyclePoint[];
  readonly conditions: readonly string[];
  readonly curve: ForceLengthCurve | null;
  /** What 0 % of the cycle is, for the axis title ("foot strike", …). */
  readonly cycleStart: string;
  readonly widthPx: number;
}

/** Sarcomere length over the gait cycle, the conditions overlaid: group mean (line) ± SD (band), regions shaded behind. */
export function cycleFigureSpec(f: CycleFigure): TopLevelSpec {
  const [lo, hi] = lengthRange(f.points.flatMap((p) => [p.meanUm, p.lowUm, p.highUm]));
  const width = plotWidth(f.widthPx, LENGTH_AXIS_PX);
  const y = fixedScale(lo, hi);
  const conditions = f.conditions.filter((c) => f.points.some((p) => p.condition === c));
  const colour = conditionColour(conditions, 'stroke');
  const regions = regionsWithin([f.curve], lo, hi);
  const xTitle = fitTitle(`gait cycle (% of stride from ${f.cycleStart})`, width);
  return {
    config: figureConfig(f.widthPx, width, [...conditions, ...regionLabels(regions)]),
    title: f.title,
    width,
    height: Math.round(Math.min(380, Math.max(220, width * 0.42))),
    layer: [
      regionBandLayer(f.curve, lo, hi, 'y', 0.14, { channel: 'fill', legend: regions }),
      {
        data: { values: f.points.map((p) => ({ ...p })) },
        layer: [
          {
            transform: [{ filter: 'isValid(datum.lowUm) && isValid(datum.highUm)' }],
            mark: { type: 'area', opacity: 0.18 },
            encoding: {
              x: { field: 'percent', type: 'quantitative', title: xTitle, scale: { domain: [0, 100], nice: false }, axis: { tickCount: tickCount(width) } },
              y: { field: 'lowUm', type: 'quantitative', title: 'sarcomere length (µm)', ...y, axis: { minExtent: LENGTH_AXIS_PX - 20, maxExtent: LENGTH_AXIS_PX - 20 } },
              y2: { field: 'highUm' },
              color: colour,
            },
          },
          {
            mark: { type: 'line', strokeWidth: 2.2 },
            encoding: {
              x: { field: 'percent', type: 'quantitative', title: xTitle, scale: { domain: [0, 100], nice: false }, axis: { tickCount: tickCount(width) } },
              y: { field: 'meanUm', type: 'quantitative', title: 'sarcomere length (µm)', ...y, axis: { minExtent: LENGTH_AXIS_PX - 20, maxExtent: LENGTH_AXIS_PX - 20 } },
              color: colour,
            },
          },
        ],
      },
    ],
  } as TopLevelSpec;
}

/** One panel of paired differences: a muscle and a kind of figure, in its unit. */
export interface DifferencePanel {
  readonly title: string;
  readonly rows: readonly DifferenceRow[];
  /** The x axis title, with the unit. */
  readonly axisTitle: string;
}

export interface DifferenceFigure {
  readonly panels: readonly DifferencePanel[];
  /** The comparisons ("b − a"), in order. */
  readonly pairs: readonly string[];
  readonly widthPx: number;
}

/** Shapes of the comparisons' points (they print in black and white). */
const PAIR_SHAPES = ['circle', 'square', 'triangle-up', 'diamond', 'triangle-down', 'cross'] as const;

/** Paired differences (b − a) with their 95 % intervals, a row per figure and a point per comparison; zero marked. */
export function differenceFigureSpec(f: DifferenceFigure): TopLevelSpec {
  const left = labelExtent(f.panels.flatMap((p) => p.rows.map((r) => figureLabel(r.figure))));
  const width = plotWidth(f.widthPx, left);
  const shape = {
    field: 'pair',
    type: 'nominal',
    scale: { domain: [...f.pairs], range: f.pairs.map((_, i) => PAIR_SHAPES[i % PAIR_SHAPES.length] as string) },
    legend: { title: 'comparison (b − a)', symbolFillColor: INK, symbolStrokeColor: INK },
  } as const;
  return {
    config: figureConfig(f.widthPx, width, f.pairs),
    vconcat: f.panels.map((p) => {
      const ticks = symmetricTicks(
        p.rows.flatMap((r) => [r.diff, r.low, r.high]),
        Math.max(3, Math.floor(width / 140)),
      );
      const r = ticks.values[ticks.values.length - 1] as number;
      const x = {
        type: 'quantitative',
        scale: { domain: [-r, r], nice: false, zero: false },
        title: fitTitle(p.axisTitle, width),
        axis: { values: ticks.values, format: `.${ticks.decimals}f` },
      } as const;
      const y = { field: 'label', type: 'nominal', title: null, sort: [...new Set(p.rows.map((r) => figureLabel(r.figure)))], axis: { minExtent: left, maxExtent: left, labelLimit: left - 8 } } as const;
      const yOffset = { field: 'pair', type: 'nominal', sort: [...f.pairs], scale: { paddingInner: 0.2 } } as const;
      return {
        title: p.title,
        width,
        height: { step: 15, for: 'offset' },
        layer: [
          { data: { values: [{ zero: 0 }] }, mark: { type: 'rule', color: MUTED, strokeDash: [4, 3] }, encoding: { x: { field: 'zero', ...x } } },
          {
            data: { values: p.rows.map((r) => ({ ...r, label: figureLabel(r.figure) })) },
            layer: [
              {
                transform: [{ filter: 'isValid(datum.low) && isValid(datum.high)' }],
                mark: { type: 'errorbar', ticks: { size: 7 }, thickness: 1.4, color: INK },
                encoding: { y, yOffset, x: { field: 'low', ...x }, x2: { field: 'high' } },
              },
              {
                mark: { type: 'point', filled: true, size: 48, color: INK, opacity: 1 },
                encoding: { y, yOffset, x: { field: 'diff', ...x }, shape },
              },
            ],
          },
        ],
      };
    }),
    resolve: { scale: { y: 'independent', x: 'independent', yOffset: 'independent' } },
  } as TopLevelSpec;
}

/**
 * Ticks of an axis centred on zero that holds every value with a little room: at most `perSide` steps of
 * 1, 2 or 5 × 10^k either side, zero among them; and the decimals their labels need.
 */
export function symmetricTicks(values: readonly (number | null)[], perSide: number): { readonly values: number[]; readonly decimals: number } {
  const reach = 1.05 * values.reduce<number>((m, v) => (v !== null && Number.isFinite(v) ? Math.max(m, Math.abs(v)) : m), 0);
  const step = reach > 0 ? nice125(reach / perSide) : 1;
  const steps = Math.max(1, Math.ceil(reach / step - 1e-9));
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  const ticks = Array.from({ length: 2 * steps + 1 }, (_, i) => Number(((i - steps) * step).toFixed(decimals)));
  return { values: ticks, decimals };
}

/** The smallest of 1, 2, 5 × 10^k at or above x. */
function nice125(x: number): number {
  const power = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 5, 10]) if (m * power >= x * (1 - 1e-9)) return m * power;
  return 10 * power;
}
