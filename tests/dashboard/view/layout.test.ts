import { describe, expect, it } from 'vitest';
import { chooseLayout, MIN_PANEL_COLS, PANEL_FIXED_ROWS } from '../../../src/dashboard/view/layout.ts';

function panelRows(l: ReturnType<typeof chooseLayout>): number {
  return PANEL_FIXED_ROWS + l.curveRows + (l.showSparkline ? 1 : 0) + (l.strideRows > 0 ? l.strideRows + 1 : 0);
}

describe('chooseLayout', () => {
  it('puts two muscles side by side on 80×24 with a curve, a sparkline and a stride table', () => {
    const l = chooseLayout(80, 23, 2, 5);
    expect(l.panelsPerRow).toBe(2);
    expect(l.panelCols).toBe(40);
    expect(l.curveRows).toBeGreaterThanOrEqual(3);
    expect(l.showSparkline).toBe(true);
    expect(l.strideRows).toBeGreaterThanOrEqual(2);
    expect(panelRows(l)).toBeLessThanOrEqual(23 - 5);
  });
  it('stacks panels when the terminal is too narrow for two', () => {
    const l = chooseLayout(MIN_PANEL_COLS * 2 - 1, 40, 2, 5);
    expect(l.panelsPerRow).toBe(1);
    expect(l.panelCols).toBe(MIN_PANEL_COLS * 2 - 1);
    expect(2 * panelRows(l)).toBeLessThanOrEqual(40 - 5);
  });
  it('gives more detail on a larger terminal', () => {
    const small = chooseLayout(80, 23, 2, 5);
    const large = chooseLayout(160, 50, 2, 5);
    expect(large.curveRows).toBeGreaterThan(small.curveRows);
    expect(large.strideRows).toBeGreaterThan(small.strideRows);
    expect(large.panelCols).toBe(80);
  });
  it('keeps a curve row even when there is no room at all, and handles no muscles', () => {
    expect(chooseLayout(30, 8, 3, 5).curveRows).toBe(1);
    expect(chooseLayout(80, 23, 0, 5).panelsPerRow).toBe(1);
  });
  it('wraps three muscles over two rows of panels on a medium terminal', () => {
    const l = chooseLayout(100, 50, 3, 5);
    expect(l.panelsPerRow).toBe(2);
    expect(2 * panelRows(l)).toBeLessThanOrEqual(50 - 5);
  });
  it('gives only the focused muscle a panel when stacked panels would not fit, one line for each other', () => {
    const l = chooseLayout(60, 23, 3, 4);
    expect(l.compact).toBe(true);
    expect(l.panelsPerRow).toBe(1);
    expect(panelRows(l) + 2).toBeLessThanOrEqual(23 - 4);
    expect(chooseLayout(80, 23, 2, 5).compact).toBe(false);
    expect(chooseLayout(60, 23, 1, 4).compact).toBe(false);
  });
});
