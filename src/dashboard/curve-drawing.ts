/**
 * The force–length curve as rows of characters: the area under the geometric curve in eighth blocks,
 * one tone per region, a marker column at the current sarcomere length, a band row for the current stride
 * (upper half blocks) and the previous stride (lower half blocks), and an axis row in µm.
 * Pure: the component only paints the runs.
 */
import { geometricForce, regionAt, type ForceLengthCurve } from '../model/geometry.ts';
import type { RegionKey } from '../model/regions.ts';

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

export function drawCurve(input: CurveDrawingInput): CurveDrawing {
  const widthCols = Math.max(1, Math.floor(input.widthCols));
  const heightRows = Math.max(1, Math.floor(input.heightRows));
  const { minUm, maxUm } = drawingRange(input.curve);
  const markerRaw = Number.isFinite(input.sarcomereUm) ? columnOf(input.sarcomereUm, minUm, maxUm, widthCols) : null;
  const markerCol = markerRaw === null ? null : Math.min(widthCols - 1, Math.max(0, markerRaw));

  const eighths: number[] = [];
  const regions: RegionKey[] = [];
  for (let col = 0; col < widthCols; col++) {
    const um = centreUm(col, minUm, maxUm, widthCols);
    eighths.push(Math.round(geometricForce(input.curve, um) * heightRows * 8));
    regions.push(regionAt(input.curve, um));
  }

  const rows: Run[][] = [];
  for (let row = 0; row < heightRows; row++) {
    const floor = (heightRows - 1 - row) * 8;
    const cells: { char: string; tone: Tone }[] = [];
    for (let col = 0; col < widthCols; col++) {
      const level = Math.min(8, Math.max(0, (eighths[col] ?? 0) - floor));
      const region = regions[col] ?? 'no_overlap';
      if (col === markerCol && markerRaw === markerCol) {
        cells.push({ char: level === 0 ? MARKER_STEM : MARKER_IN_AREA, tone: 'marker' });
      } else {
        cells.push(level === 0 ? { char: ' ', tone: 'empty' } : { char: EIGHTHS[level] ?? '█', tone: region });
      }
    }
    rows.push(toRuns(cells));
  }

  const current = spanCols(input.current, minUm, maxUm, widthCols);
  const previous = spanCols(input.previous, minUm, maxUm, widthCols);
  const band: { char: string; tone: Tone }[] = [];
  for (let col = 0; col < widthCols; col++) {
    const inCurrent = current !== null && col >= current[0] && col <= current[1];
    const inPrevious = previous !== null && col >= previous[0] && col <= previous[1];
    if (col === markerCol && markerRaw !== null) {
      const char = markerRaw < 0 ? MARKER_LEFT : markerRaw >= widthCols ? MARKER_RIGHT : MARKER_IN_BAND;
      band.push({ char, tone: 'marker' });
    } else if (inCurrent || inPrevious) {
      if (inCurrent && inPrevious) band.push({ char: input.bothChar ?? '█', tone: 'band_both' });
      else band.push(inCurrent ? { char: '▀', tone: 'band_current' } : { char: '▄', tone: 'band_previous' });
    } else {
      band.push({ char: ' ', tone: 'empty' });
    }
  }
  rows.push(toRuns(band));
  rows.push(axisRow(minUm, maxUm, widthCols));
  return { rows, minUm, maxUm, markerCol };
}
