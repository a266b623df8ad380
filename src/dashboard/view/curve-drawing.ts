/**
 * The force–length curve as rows of characters: the area under the geometric curve in eighth blocks,
 * one tone per region (without colour, each region's full cells in a fill character of its own), a marker column at the current sarcomere length, a band row for the current stride
 * (upper half blocks) and the previous stride (lower half blocks), and an axis row in µm.
 * Pure: the component only paints the runs.
 */
import { geometricForce, regionAt, type ForceLengthCurve } from '../../model/geometry.ts';
import type { RegionKey } from '../../model/regions.ts';

export type Tone = RegionKey | 'empty' | 'marker' | 'band_current' | 'band_previous' | 'band_both' | 'axis';

export interface Run {
  readonly text: string;
  readonly tone: Tone;
}

export interface LengthRange {
  readonly slMinUm: number;
  readonly slMaxUm: number;
}

export interface CurveDrawingInput {
  readonly curve: ForceLengthCurve;
  readonly widthCols: number;
  readonly heightRows: number;
  /** NaN: no marker. */
  readonly sarcomereUm: number;
  readonly current: LengthRange | null;
  readonly previous: LengthRange | null;
  /**
   * The character where both strides' ranges cover a column: a full block, or an upper half whose
   * background (painted by the theme) shows the previous stride. @default '█'
   */
  readonly bothChar?: string;
  /** @default 'blocks' */
  readonly fill?: CurveFill;
}

export interface CurveDrawing {
  /** Curve rows top to bottom, then the band row, then the axis row. */
  readonly rows: readonly (readonly Run[])[];
  readonly minUm: number;
  readonly maxUm: number;
  /** Column of the marker (clamped to the edges when outside), null without a length. */
  readonly markerCol: number | null;
}

const EIGHTHS = [' ', '▁', '▂', '▃', '▄', '▅', '▆', '▇', '█'] as const;

/**
 * How the area under the curve is drawn: 'blocks', every region alike (colour tells them apart), or
 * 'patterns', for a screen without colour: a region's full cells in its REGION_FILL character (the
 * cells at the top edge stay eighth blocks, so the curve keeps its shape).
 */
export type CurveFill = 'blocks' | 'patterns';

/**
 * The full cells of each region under 'patterns', denser towards peak force; neighbours always differ.
 * The regions short of the steep limb and past overlap have no force, so no area to fill.
 */
export const REGION_FILL: Readonly<Record<RegionKey, string>> = {
  too_short: '█',
  steep_ascending: '▓',
  shallow_ascending: '▒',
  plateau: '█',
  descending: '░',
  no_overlap: '█',
};

/** The regions that have an area under the curve, so a fill of their own. */
export const FILLED_REGIONS = ['steep_ascending', 'shallow_ascending', 'plateau', 'descending'] as const satisfies readonly RegionKey[];

/** A filled cell's character: an eighth block, or the region's fill for a full cell under 'patterns'. */
function cellChar(level: number, region: RegionKey, fill: CurveFill): string {
  return level >= 8 && fill === 'patterns' ? REGION_FILL[region] : (EIGHTHS[level] ?? '█');
}
export const MARKER_IN_BAND = '◆';
export const MARKER_LEFT = '◀';
export const MARKER_RIGHT = '▶';
export const MARKER_STEM = '│';
/** The marker column inside the filled area: a heavy line between full blocks reads as a slit. */
export const MARKER_IN_AREA = '┃';

/** The sarcomere lengths the x axis spans: a little beyond the curve's zero-force ends. */
export function drawingRange(curve: ForceLengthCurve): { readonly minUm: number; readonly maxUm: number } {
  return { minUm: curve.steepZeroUm - 0.1, maxUm: curve.descendingZeroUm + 0.1 };
}

/** Column whose span holds `um`; -1 left of the axis, widthCols right of it. */
export function columnOf(um: number, minUm: number, maxUm: number, widthCols: number): number {
  if (um < minUm) return -1;
  if (um >= maxUm) return widthCols;
  return Math.min(widthCols - 1, Math.floor(((um - minUm) / (maxUm - minUm)) * widthCols));
}

function centreUm(col: number, minUm: number, maxUm: number, widthCols: number): number {
  return minUm + ((col + 0.5) * (maxUm - minUm)) / widthCols;
}

/** Joins consecutive cells of one tone into runs. */
export function toRuns(cells: readonly { char: string; tone: Tone }[]): Run[] {
  const runs: Run[] = [];
  let text = '';
  let tone: Tone | null = null;
  for (const cell of cells) {
    if (cell.tone !== tone && tone !== null) {
      runs.push({ text, tone });
      text = '';
    }
    tone = cell.tone;
    text += cell.char;
  }
  if (tone !== null) runs.push({ text, tone });
  return runs;
}

/** A row's width in cells. */
export function rowCols(runs: readonly Run[]): number {
  let cols = 0;
  for (const run of runs) cols += run.text.length;
  return cols;
}

function spanCols(range: LengthRange | null, minUm: number, maxUm: number, widthCols: number): [number, number] | null {
  if (range === null || !Number.isFinite(range.slMinUm) || !Number.isFinite(range.slMaxUm)) return null;
  const from = Math.max(0, columnOf(range.slMinUm, minUm, maxUm, widthCols));
  const to = Math.min(widthCols - 1, columnOf(range.slMaxUm, minUm, maxUm, widthCols));
  return from <= to ? [from, to] : null;
}

function axisRow(minUm: number, maxUm: number, widthCols: number): Run[] {
  const chars = Array.from({ length: widthCols }, () => ' ');
  let freeFrom = 0;
  for (let um = Math.ceil(minUm * 2) / 2; um <= maxUm; um += 0.5) {
    const label = um.toFixed(1);
    const col = columnOf(um, minUm, maxUm, widthCols);
    const start = Math.max(0, col - 1);
    if (start < freeFrom || start + label.length > widthCols) continue;
    for (let i = 0; i < label.length; i++) chars[start + i] = label[i] ?? ' ';
    freeFrom = start + label.length + 1;
  }
  const unit = 'µm';
  if (freeFrom <= widthCols - unit.length) {
    chars[widthCols - 2] = 'µ';
    chars[widthCols - 1] = 'm';
  }
  return [{ text: chars.join(''), tone: 'axis' }];
}

/**
 * What depends only on the curve and the drawing's size: the filled level of each cell, each column's
 * region, the curve rows without a marker, the axis row. Drawn once per curve and size (see curveLayers).
 */
export interface CurveLayers {
  readonly widthCols: number;
  readonly heightRows: number;
  readonly minUm: number;
  readonly maxUm: number;
  readonly fill: CurveFill;
  /** Filled eighths (0–8) of each cell, row by row from the top. */
  readonly levels: readonly Uint8Array[];
  readonly regions: readonly RegionKey[];
  /** The curve rows with no marker, top to bottom. */
  readonly body: readonly (readonly Run[])[];
  readonly axis: readonly Run[];
  /** The marker's characters down the curve rows at `col` (a stem over empty cells, a heavy line in the area), top to bottom. */
  markerColumn(col: number): readonly string[];
}

function buildLayers(curve: ForceLengthCurve, widthCols: number, heightRows: number, fill: CurveFill): CurveLayers {
  const { minUm, maxUm } = drawingRange(curve);
  const eighths: number[] = [];
  const regions: RegionKey[] = [];
  for (let col = 0; col < widthCols; col++) {
    const um = centreUm(col, minUm, maxUm, widthCols);
    eighths.push(Math.round(geometricForce(curve, um) * heightRows * 8));
    regions.push(regionAt(curve, um));
  }
  const levels: Uint8Array[] = [];
  const body: Run[][] = [];
  for (let row = 0; row < heightRows; row++) {
    const floor = (heightRows - 1 - row) * 8;
    const rowLevels = new Uint8Array(widthCols);
    const cells: { char: string; tone: Tone }[] = [];
    for (let col = 0; col < widthCols; col++) {
      const level = Math.min(8, Math.max(0, (eighths[col] ?? 0) - floor));
      rowLevels[col] = level;
      const region = regions[col] ?? 'no_overlap';
      cells.push(level === 0 ? { char: ' ', tone: 'empty' } : { char: cellChar(level, region, fill), tone: region });
    }
    levels.push(rowLevels);
    body.push(toRuns(cells));
  }
  const columns = new Map<number, readonly string[]>();
  return {
    widthCols,
    heightRows,
    minUm,
    maxUm,
    fill,
    levels,
    regions,
    body,
    axis: axisRow(minUm, maxUm, widthCols),
    markerColumn(col: number): readonly string[] {
      let column = columns.get(col);
      if (column === undefined) {
        column = levels.map((rowLevels) => ((rowLevels[col] ?? 0) === 0 ? MARKER_STEM : MARKER_IN_AREA));
        columns.set(col, column);
      }
      return column;
    },
  };
}

const layersByCurve = new WeakMap<ForceLengthCurve, Map<string, CurveLayers>>();

/**
 * The layers of `curve` at this size, drawn on first request and then kept: the same object for the
 * same curve object and size, so screens can skip repainting what did not change. Curves are few and
 * immutable; a curve no longer referenced takes its drawings with it.
 */
export function curveLayers(curve: ForceLengthCurve, widthCols: number, heightRows: number, fill: CurveFill = 'blocks'): CurveLayers {
  const width = Math.max(1, Math.floor(widthCols));
  const height = Math.max(1, Math.floor(heightRows));
  let bySize = layersByCurve.get(curve);
  if (bySize === undefined) {
    bySize = new Map();
    layersByCurve.set(curve, bySize);
  }
  const key = `${width}x${height}:${fill}`;
  let layers = bySize.get(key);
  if (layers === undefined) {
    layers = buildLayers(curve, width, height, fill);
    bySize.set(key, layers);
  }
  return layers;
}

/** The marker's column unclamped (-1 left of the axis, widthCols right of it), null without a length. */
export function markerRawCol(sarcomereUm: number, layers: Pick<CurveLayers, 'minUm' | 'maxUm' | 'widthCols'>): number | null {
  return Number.isFinite(sarcomereUm) ? columnOf(sarcomereUm, layers.minUm, layers.maxUm, layers.widthCols) : null;
}

/** The band row: this stride's range (upper halves), the previous one's (lower halves), and the marker or an arrow at the edge. */
export function bandRow(
  layers: Pick<CurveLayers, 'minUm' | 'maxUm' | 'widthCols'>,
  markerRaw: number | null,
  current: LengthRange | null,
  previous: LengthRange | null,
  bothChar = '█',
): Run[] {
  const { minUm, maxUm, widthCols } = layers;
  const markerCol = markerRaw === null ? null : Math.min(widthCols - 1, Math.max(0, markerRaw));
  const currentSpan = spanCols(current, minUm, maxUm, widthCols);
  const previousSpan = spanCols(previous, minUm, maxUm, widthCols);
  const band: { char: string; tone: Tone }[] = [];
  for (let col = 0; col < widthCols; col++) {
    const inCurrent = currentSpan !== null && col >= currentSpan[0] && col <= currentSpan[1];
    const inPrevious = previousSpan !== null && col >= previousSpan[0] && col <= previousSpan[1];
    if (col === markerCol && markerRaw !== null) {
      const char = markerRaw < 0 ? MARKER_LEFT : markerRaw >= widthCols ? MARKER_RIGHT : MARKER_IN_BAND;
      band.push({ char, tone: 'marker' });
    } else if (inCurrent || inPrevious) {
      if (inCurrent && inPrevious) band.push({ char: bothChar, tone: 'band_both' });
      else band.push(inCurrent ? { char: '▀', tone: 'band_current' } : { char: '▄', tone: 'band_previous' });
    } else {
      band.push({ char: ' ', tone: 'empty' });
    }
  }
  return toRuns(band);
}

/** The columns a band row covers, as a short key: rows with the same key are drawn alike. */
export function bandKey(
  layers: Pick<CurveLayers, 'minUm' | 'maxUm' | 'widthCols'>,
  markerRaw: number | null,
  current: LengthRange | null,
  previous: LengthRange | null,
): string {
  const { minUm, maxUm, widthCols } = layers;
  const c = spanCols(current, minUm, maxUm, widthCols);
  const p = spanCols(previous, minUm, maxUm, widthCols);
  return `${markerRaw ?? ''}|${c?.[0] ?? ''}-${c?.[1] ?? ''}|${p?.[0] ?? ''}-${p?.[1] ?? ''}`;
}

/** The whole drawing as rows of runs (the curve rows with the marker in them, the band, the axis). */
export function drawCurve(input: CurveDrawingInput): CurveDrawing {
  const layers = curveLayers(input.curve, input.widthCols, input.heightRows, input.fill);
  const { widthCols, minUm, maxUm } = layers;
  const markerRaw = markerRawCol(input.sarcomereUm, layers);
  const markerCol = markerRaw === null ? null : Math.min(widthCols - 1, Math.max(0, markerRaw));
  const rows: (readonly Run[])[] = [];
  for (let row = 0; row < layers.heightRows; row++) {
    const rowLevels = layers.levels[row] ?? new Uint8Array(widthCols);
    if (markerCol === null || markerRaw !== markerCol) {
      rows.push(layers.body[row] ?? []);
      continue;
    }
    const cells: { char: string; tone: Tone }[] = [];
    for (let col = 0; col < widthCols; col++) {
      const level = rowLevels[col] ?? 0;
      if (col === markerCol) cells.push({ char: level === 0 ? MARKER_STEM : MARKER_IN_AREA, tone: 'marker' });
      else {
        const region = layers.regions[col] ?? 'no_overlap';
        cells.push(level === 0 ? { char: ' ', tone: 'empty' } : { char: cellChar(level, region, layers.fill), tone: region });
      }
    }
    rows.push(toRuns(cells));
  }
  rows.push(bandRow(layers, markerRaw, input.current, input.previous, input.bothChar));
  rows.push(layers.axis);
  return { rows, minUm, maxUm, markerCol };
}
