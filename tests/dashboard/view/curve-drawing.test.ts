import { describe, expect, it } from 'vitest';
import {
  columnOf,
  drawCurve,
  drawingRange,
  MARKER_IN_AREA,
  MARKER_IN_BAND,
  MARKER_LEFT,
  MARKER_RIGHT,
  MARKER_STEM,
  toRuns,
  type CurveDrawing,
  type CurveDrawingInput,
} from '../../../src/dashboard/view/curve-drawing.ts';
import { speciesCurve } from '../../../src/model/species.ts';

const human = speciesCurve('human');
const frog = speciesCurve('frog');

function rowText(drawing: CurveDrawing, row: number): string {
  return (drawing.rows[row] ?? []).map((r) => r.text).join('');
}

/** Filled eighths of one column over the curve rows (a full block is 8). */
function columnEighths(drawing: CurveDrawing, col: number, heightRows: number): number {
  const levels = ' ▁▂▃▄▅▆▇█';
  let eighths = 0;
  for (let row = 0; row < heightRows; row++) {
    const char = [...rowText(drawing, row)][col] ?? ' ';
    eighths += char === MARKER_IN_AREA ? 8 : Math.max(0, levels.indexOf(char));
  }
  return eighths;
}

function draw(sarcomereUm = Number.NaN, curve = human, widthCols = 60, heightRows = 6) {
  return drawCurve({ curve, widthCols, heightRows, sarcomereUm, current: null, previous: null });
}

/** The human curve with no marker, this wide and high, banding these strides' ranges. */
function drawBands(widthCols: number, heightRows: number, bands: Pick<CurveDrawingInput, 'current' | 'previous' | 'bothChar'>) {
  return drawCurve({ curve: human, widthCols, heightRows, sarcomereUm: Number.NaN, ...bands });
}

describe('drawCurve', () => {
  it('draws every row at the given width: the curve rows, a band row and an axis row', () => {
    const d = draw(2.7);
    expect(d.rows).toHaveLength(6 + 2);
    for (let row = 0; row < d.rows.length; row++) expect([...rowText(d, row)]).toHaveLength(60);
  });

  it('draws a one-column, one-row curve without failing', () => {
    const d = drawCurve({ curve: human, widthCols: 1, heightRows: 1, sarcomereUm: 2.7, current: null, previous: null });
    expect(d.rows).toHaveLength(3);
    expect(d.markerCol).toBe(0);
  });

  it('fills the plateau to full height and leaves no fill past the end of overlap (human)', () => {
    // Human plateau 2.64–2.81 µm and zero active force at 4.24 µm: Rassier, MacIntosh & Herzog 1999,
    // J Appl Physiol 86:1445–1457 (from memory; the figure was not at hand).
    const d = draw();
    const { minUm, maxUm } = d;
    expect(columnEighths(d, columnOf(2.72, minUm, maxUm, 60), 6)).toBe(48);
    expect(columnEighths(d, columnOf(4.3, minUm, maxUm, 60), 6)).toBe(0);
    // Descending limb, linear from 2.81 to 4.24 µm: at 3.5 µm force ≈ (4.24 − 3.5)/(4.24 − 2.81) ≈ 0.52.
    const col = columnOf(3.5, minUm, maxUm, 60);
    expect(columnEighths(d, col, 6) / 48).toBeCloseTo(0.52, 1);
  });

  it('fills the frog plateau to full height and draws nothing past 3.65 µm', () => {
    // Frog: plateau 2.05–2.2 µm, no overlap beyond 3.65 µm: Gordon, Huxley & Julian 1966,
    // J Physiol 184:170–192 (from memory; the paper was not at hand).
    const d = draw(Number.NaN, frog, 80, 4);
    expect(columnEighths(d, columnOf(2.12, d.minUm, d.maxUm, 80), 4)).toBe(32);
    expect(columnEighths(d, columnOf(3.7, d.minUm, d.maxUm, 80), 4)).toBe(0);
  });

  it('moves the marker right as the sarcomere length grows', () => {
    const cols = [2.0, 2.5, 2.72, 3.2, 4.0].map((um) => draw(um).markerCol ?? -1);
    for (let i = 1; i < cols.length; i++) expect(cols[i]).toBeGreaterThan(cols[i - 1] ?? Infinity);
  });

  it('puts the marker in the band row and as a stem through the curve at its column', () => {
    const d = draw(3.2);
    const col = d.markerCol ?? -1;
    expect([...rowText(d, 6)][col]).toBe(MARKER_IN_BAND);
    const column = d.rows.slice(0, 6).map((_, row) => [...rowText(d, row)][col]);
    expect(column.every((c) => c === MARKER_STEM || c === MARKER_IN_AREA)).toBe(true);
    expect(column).toContain(MARKER_IN_AREA);
  });

  it('shows an arrow at the edge for a length off the axis, with no stem', () => {
    const right = draw(5.2);
    expect([...rowText(right, 6)].at(-1)).toBe(MARKER_RIGHT);
    const left = draw(0.9);
    expect([...rowText(left, 6)][0]).toBe(MARKER_LEFT);
    for (let row = 0; row < 6; row++) {
      expect(rowText(right, row)).not.toContain(MARKER_STEM);
      expect(rowText(left, row)).not.toContain(MARKER_IN_AREA);
    }
  });

  it('has no marker while the length is unknown', () => {
    const d = draw(Number.NaN);
    expect(d.markerCol).toBeNull();
    expect(d.rows.map((_, i) => rowText(d, i)).join('')).not.toMatch(/[◆│┃◀▶]/);
  });

  it('bands the current stride with upper halves, the previous with lower halves and both with full blocks', () => {
    const d = drawBands(60, 4, { current: { slMinUm: 2.5, slMaxUm: 3.0 }, previous: { slMinUm: 2.8, slMaxUm: 3.4 } });
    const band = [...rowText(d, 4)];
    const at = (um: number) => band[columnOf(um, d.minUm, d.maxUm, 60)];
    expect(at(2.6)).toBe('▀');
    expect(at(2.9)).toBe('█');
    expect(at(3.3)).toBe('▄');
    expect(at(2.2)).toBe(' ');
    expect(at(3.6)).toBe(' ');
  });

  it('draws both strides in one half block when asked, toned so the theme paints the previous one under it', () => {
    const d = drawBands(60, 2, { current: { slMinUm: 2.5, slMaxUm: 3.0 }, previous: { slMinUm: 2.8, slMaxUm: 3.4 }, bothChar: '▀' });
    const tones = (d.rows[2] ?? []).map((r) => r.tone);
    expect(tones).toEqual(['empty', 'band_current', 'band_both', 'band_previous', 'empty']);
    expect((d.rows[2] ?? []).find((r) => r.tone === 'band_both')?.text).toMatch(/^▀+$/);
  });

  it('leaves the band empty for a stride with no length yet', () => {
    const d = drawBands(40, 2, { current: { slMinUm: Number.POSITIVE_INFINITY, slMaxUm: Number.NEGATIVE_INFINITY }, previous: null });
    expect(rowText(d, 2).trim()).toBe('');
  });

  it('labels the axis in µm at half-micrometre ticks', () => {
    const axis = rowText(draw(), 7);
    for (const label of ['1.5', '2.0', '2.5', '3.0', '3.5', '4.0']) expect(axis).toContain(label);
    expect(axis.trimEnd().endsWith('µm')).toBe(true);
  });

  it('spans a little beyond the curve’s zero-force ends', () => {
    const { minUm, maxUm } = drawingRange(human);
    expect(minUm).toBeLessThan(human.steepZeroUm);
    expect(maxUm).toBeGreaterThan(human.descendingZeroUm);
  });
});

describe('columnOf and toRuns', () => {
  it('maps lengths to columns, with -1 and the width for beyond either end', () => {
    expect(columnOf(1, 2, 4, 20)).toBe(-1);
    expect(columnOf(2, 2, 4, 20)).toBe(0);
    expect(columnOf(3, 2, 4, 20)).toBe(10);
    expect(columnOf(4, 2, 4, 20)).toBe(20);
  });
  it('joins cells of one tone', () => {
    expect(toRuns([])).toEqual([]);
    expect(
      toRuns([
        { char: 'a', tone: 'plateau' },
        { char: 'b', tone: 'plateau' },
        { char: 'c', tone: 'marker' },
      ]),
    ).toEqual([
      { text: 'ab', tone: 'plateau' },
      { text: 'c', tone: 'marker' },
    ]);
  });
});
