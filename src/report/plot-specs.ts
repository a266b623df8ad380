/**
 * The report's plots as vega-lite specs: the force–length curve with the time at each length over it,
 * sarcomere length over the gait cycle, per-stride ranges, and two study overviews. Data are inlined
 * (`values`), so rendering needs nothing but the spec.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { ForceLengthCurve } from '../model/geometry.ts';
import { REGION_KEYS, REGION_LABEL, type RegionKey } from '../model/regions.ts';
import { CYCLE_BAND, CYCLE_LINE, FLAGGED, INK, MUTED, REGION_RANGE } from './colours.ts';
import { curvePoints, regionBands, type CycleRow, type LengthBin, type StrideRow, type TimeAtLength } from './plot-data.ts';

const WIDTH = 360;

/** A scale over exactly [lo, hi] (no rounding out, no forced zero). */
export function fixedScale(lo: number, hi: number): { scale: { domain: number[]; nice: boolean; zero: boolean } } {
  return { scale: { domain: [lo, hi], nice: false, zero: false } };
}
const HEIGHT = 200;

/**
 * The region colour scale (fixed domain, so every plot colours a region alike), with a legend of the
 * given regions in plain words, or none (the small plots).
 */
export const regionColour = (legendRegions: readonly RegionKey[] | null = null) =>
  ({
    field: 'region',
    type: 'nominal',
    scale: { domain: [...REGION_KEYS], range: [...REGION_RANGE] },
    legend:
      legendRegions === null
        ? null
        : { title: 'region of the force–length curve', orient: 'bottom', direction: 'horizontal', values: [...legendRegions], labelExpr: regionLabelExpr() },
  }) as const;

/** A vega expression turning a region key into its plain-words label. */
function regionLabelExpr(): string {
  return REGION_KEYS.map((k) => `datum.label === '${k}' ? '${REGION_LABEL[k]}' : `).join('') + 'datum.label';
}

function bandRows(curve: ForceLengthCurve, lo: number, hi: number): { region: RegionKey; label: string; from: number; to: number }[] {
  return regionBands(curve, lo, hi).map((b) => ({ region: b.region, label: REGION_LABEL[b.region], from: b.fromUm, to: b.toUm }));
}

/** How a band layer colours its regions: the channel, and the regions its legend lists (null: no legend). */
export interface BandColouring {
  /** `fill` leaves the colour channel to what is drawn over the bands (conditions). @default 'color' */
  readonly channel?: 'color' | 'fill';
  /** @default null */
  readonly legend?: readonly RegionKey[] | null;
}

/** The curve's regions over [lo, hi] as shaded bands behind a plot, along its length axis; none without a curve. */
export function regionBandLayer(curve: ForceLengthCurve | null, lo: number, hi: number, lengthAxis: 'x' | 'y', opacity: number, colouring: BandColouring = {}) {
  const from = { field: 'from', type: 'quantitative', ...fixedScale(lo, hi) } as const;
  const to = { field: 'to' } as const;
  const scale = regionColour(colouring.legend ?? null);
  // The bands are faint; their legend's swatches a little less so, to be told apart.
  const colour = { [colouring.channel ?? 'color']: scale.legend === null ? scale : { ...scale, legend: { ...scale.legend, symbolOpacity: Math.min(1, opacity * 3.5) } } };
  return {
    data: { values: curve === null ? [] : bandRows(curve, lo, hi) },
    mark: { type: 'rect', opacity },
    encoding: lengthAxis === 'x' ? { x: from, x2: to, ...colour } : { y: from, y2: to, ...colour },
  } as const;
}

export interface ForceLengthPlot {
  readonly curve: ForceLengthCurve;
  readonly time: TimeAtLength;
  /** Markers along the length axis: the trial's 5th percentile, mean and 95th percentile (null: not known). */
  readonly p5Um: number | null;
  readonly meanUm: number | null;
  readonly p95Um: number | null;
  /** Percent of time per this many µm (the bars' unit). */
  readonly binUm: number;
}

/** The force–length curve (left axis) with the share of time at each length drawn over it as bars (right axis). */
export function forceLengthSpec(p: ForceLengthPlot): TopLevelSpec {
  const points = curvePoints(p.curve);
  const lo = (points[0] as { slUm: number }).slUm;
  const hi = (points[points.length - 1] as { slUm: number }).slUm;
  const x = fixedScale(lo, hi);
  const markers = [
    { name: 'p5', slUm: p.p5Um },
    { name: 'mean', slUm: p.meanUm },
    { name: 'p95', slUm: p.p95Um },
  ].filter((m): m is { name: string; slUm: number } => m.slUm !== null && Number.isFinite(m.slUm));
  const bins = p.time.bins.map((b: LengthBin) => ({ from: b.fromUm, to: b.toUm, percent: b.percent, region: b.region }));
  return {
    width: WIDTH,
    height: HEIGHT,
    layer: [
      regionBandLayer(p.curve, lo, hi, 'x', 0.13),
      {
        data: { values: bins },
        mark: { type: 'rect', opacity: 0.85 },
        encoding: {
          x: { field: 'from', type: 'quantitative', ...x },
          x2: { field: 'to' },
          y: { field: 'percent', type: 'quantitative', axis: { orient: 'right', title: `time (% per ${p.binUm} µm)`, grid: false } },
          y2: { datum: 0 },
          color: regionColour(),
        },
      },
      {
        data: { values: points },
        mark: { type: 'line', color: INK, strokeWidth: 1.6 },
        encoding: {
          x: { field: 'slUm', type: 'quantitative', title: 'sarcomere length (µm)', ...x },
          y: { field: 'force', type: 'quantitative', title: 'relative active force', scale: { domain: [0, 1.05] }, axis: { orient: 'left' } },
        },
      },
      {
        data: { values: markers },
        layer: [
          {
            mark: { type: 'rule', color: INK, strokeDash: [3, 3], strokeWidth: 1 },
            encoding: { x: { field: 'slUm', type: 'quantitative', ...x } },
          },
          {
            mark: { type: 'text', color: MUTED, fontSize: 9, dy: -4, baseline: 'bottom', y: 0 },
            encoding: { x: { field: 'slUm', type: 'quantitative', ...x }, text: { field: 'name' } },
          },
        ],
      },
    ],
    resolve: { scale: { y: 'independent' } },
  };
}

export interface CyclePlot {
  readonly curve: ForceLengthCurve;
  readonly rows: readonly CycleRow[];
  readonly domainUm: readonly [number, number];
  /** Mean toe-off, % of the cycle; null when unknown. */
  readonly toeOffPercent: number | null;
}

/** Sarcomere length over the gait cycle: mean line, mean ± SD band, regions shaded behind, toe-off marked. */
export function cycleSpec(p: CyclePlot): TopLevelSpec {
  const [lo, hi] = p.domainUm;
  const y = fixedScale(lo, hi);
  const toeOff = p.toeOffPercent === null ? [] : [{ percent: p.toeOffPercent, label: 'toe-off' }];
  return {
    width: WIDTH,
    height: HEIGHT,
    layer: [
      regionBandLayer(p.curve, lo, hi, 'y', 0.16),
      {
        data: { values: p.rows.map((r) => ({ ...r })) },
        layer: [
          {
            mark: { type: 'area', color: CYCLE_BAND, opacity: 0.45 },
            encoding: {
              x: { field: 'percent', type: 'quantitative', title: 'gait cycle (% of stride from foot strike)', scale: { domain: [0, 100], nice: false } },
              y: { field: 'lowUm', type: 'quantitative', title: 'sarcomere length (µm)', ...y },
              y2: { field: 'highUm' },
            },
          },
          {
            mark: { type: 'line', color: CYCLE_LINE, strokeWidth: 1.8 },
            encoding: { x: { field: 'percent', type: 'quantitative' }, y: { field: 'meanUm', type: 'quantitative', ...y } },
          },
        ],
      },
      {
        data: { values: toeOff },
        layer: [
          { mark: { type: 'rule', color: MUTED, strokeDash: [4, 3] }, encoding: { x: { field: 'percent', type: 'quantitative' } } },
          {
            mark: { type: 'text', color: MUTED, fontSize: 9, align: 'left', dx: 3, baseline: 'top', y: 2 },
            encoding: { x: { field: 'percent', type: 'quantitative' }, text: { field: 'label' } },
          },
        ],
      },
    ],
  };
}

export interface StridePlot {
  readonly curve: ForceLengthCurve;
  readonly rows: readonly StrideRow[];
  readonly domainUm: readonly [number, number];
}

/** One bar per stride from its shortest to its longest length, a thicker bar over 5th–95th percentile, a tick at the mean. */
export function strideSpec(p: StridePlot): TopLevelSpec {
  const [lo, hi] = p.domainUm;
  const y = fixedScale(lo, hi);
  const maxIndex = p.rows.reduce((m, r) => Math.max(m, r.index), 0);
  const x = fixedScale(-0.5, maxIndex + 0.5);
  const values = p.rows.map((r) => ({ ...r }));
  // Fixed colours, not a scale: the region bands behind own the colour scale.
  const status = { condition: { test: 'datum.flagged', value: FLAGGED }, value: INK } as const;
  const statusBand = { condition: { test: 'datum.flagged', value: FLAGGED }, value: CYCLE_BAND } as const;
  const barWidth = Math.max(1, Math.min(6, (0.6 * WIDTH) / Math.max(1, maxIndex + 1)));
  return {
    width: WIDTH,
    height: HEIGHT,
    layer: [
      regionBandLayer(p.curve, lo, hi, 'y', 0.16),
      {
        data: { values },
        layer: [
          {
            mark: { type: 'rule', strokeWidth: Math.max(1, barWidth / 3) },
            encoding: {
              x: { field: 'index', type: 'quantitative', title: 'stride', ...x, axis: { tickMinStep: 1, format: 'd' } },
              y: { field: 'minUm', type: 'quantitative', title: 'sarcomere length (µm)', ...y },
              y2: { field: 'maxUm' },
              color: status,
            },
          },
          {
            transform: [{ filter: 'isValid(datum.p5Um) && isValid(datum.p95Um)' }],
            mark: { type: 'rule', strokeWidth: barWidth, opacity: 0.9 },
            encoding: {
              x: { field: 'index', type: 'quantitative', ...x },
              y: { field: 'p5Um', type: 'quantitative', ...y },
              y2: { field: 'p95Um' },
              color: statusBand,
            },
          },
          {
            transform: [{ filter: 'isValid(datum.meanUm)' }],
            mark: { type: 'tick', orient: 'horizontal', thickness: 1.5, size: Math.max(3, barWidth * 1.6) },
            encoding: {
              x: { field: 'index', type: 'quantitative', ...x },
              y: { field: 'meanUm', type: 'quantitative', ...y },
              color: { value: INK },
            },
          },
        ],
      },
    ],
  };
}

/** One row of the study overviews: a trial × muscle. */
export interface OverviewRow {
  readonly label: string;
  readonly regionFraction: Readonly<Record<RegionKey, number>>;
  readonly minUm: number | null;
  readonly p5Um: number | null;
  readonly meanUm: number | null;
  readonly p95Um: number | null;
  readonly maxUm: number | null;
}

function overviewHeight(rows: number): number {
  return Math.max(40, rows * 18);
}

/** The share of time in each region, one stacked bar per trial × muscle, with the region legend. */
export function regionShareSpec(rows: readonly OverviewRow[]): TopLevelSpec {
  const values = rows.flatMap((r, order) =>
    REGION_KEYS.map((region, k) => ({ label: r.label, order, region, k, percent: 100 * r.regionFraction[region] })),
  );
  return {
    width: 420,
    height: overviewHeight(rows.length),
    data: { values },
    mark: { type: 'bar' },
    encoding: {
      y: { field: 'label', type: 'nominal', title: null, sort: { field: 'order', op: 'min' }, axis: { labelLimit: 480 } },
      x: { field: 'percent', type: 'quantitative', title: 'time in each region (% of stride time)', stack: 'zero', scale: { domain: [0, 100] } },
      color: regionColour(),
      order: { field: 'k', type: 'quantitative' },
    },
  };
}

/** Operating range per trial × muscle: min–max line, 5th–95th percentile bar, mean point; plateau shaded. */
export function rangeOverviewSpec(rows: readonly OverviewRow[], curve: ForceLengthCurve | null): TopLevelSpec {
  const values = rows.map((r, order) => ({ ...r, order }));
  const finite = rows.flatMap((r) => [r.minUm, r.maxUm]).filter((v): v is number => v !== null && Number.isFinite(v));
  const lo = finite.length > 0 ? Math.floor((Math.min(...finite) - 0.1) * 10) / 10 : 1.5;
  const hi = finite.length > 0 ? Math.ceil((Math.max(...finite) + 0.1) * 10) / 10 : 4;
  const x = fixedScale(lo, hi);
  const yEnc = { field: 'label', type: 'nominal', title: null, sort: { field: 'order', op: 'min' }, axis: { labelLimit: 480 } } as const;
  return {
    width: 420,
    height: overviewHeight(rows.length),
    layer: [
      regionBandLayer(curve, lo, hi, 'x', 0.16),
      {
        data: { values },
        layer: [
          {
            transform: [{ filter: 'isValid(datum.minUm) && isValid(datum.maxUm)' }],
            mark: { type: 'rule', color: MUTED },
            encoding: { y: yEnc, x: { field: 'minUm', type: 'quantitative', title: 'sarcomere length (µm): min–max, 5th–95th percentile, mean', ...x }, x2: { field: 'maxUm' } },
          },
          {
            transform: [{ filter: 'isValid(datum.p5Um) && isValid(datum.p95Um)' }],
            mark: { type: 'rule', color: CYCLE_LINE, strokeWidth: 6, opacity: 0.6 },
            encoding: { y: yEnc, x: { field: 'p5Um', type: 'quantitative', ...x }, x2: { field: 'p95Um' } },
          },
          {
            transform: [{ filter: 'isValid(datum.meanUm)' }],
            mark: { type: 'point', filled: true, color: INK, size: 30 },
            encoding: { y: yEnc, x: { field: 'meanUm', type: 'quantitative', ...x } },
          },
        ],
      },
    ],
  };
}
