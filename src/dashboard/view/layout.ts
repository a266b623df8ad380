/** How the screen is divided for a terminal size and a number of muscles. Pure, so each size is testable. */

/** Narrower than this, a panel's curve is too coarse to read: panels stack instead. */
export const MIN_PANEL_COLS = 38;
/** Rows of a panel that do not depend on the terminal: border (2), title, band, axis, four number lines. */
export const PANEL_FIXED_ROWS = 9;

export interface Layout {
  /** Panels side by side per row of panels. */
  readonly panelsPerRow: number;
  readonly panelCols: number;
  readonly curveRows: number;
  readonly showSparkline: boolean;
  /** Completed strides listed in each panel (0: no table). */
  readonly strideRows: number;
  /**
   * Too little room for a panel each: only the focused muscle gets a panel, every other muscle one line
   * under it.
   */
  readonly compact: boolean;
}

function fillPanel(budget: number): Pick<Layout, 'curveRows' | 'showSparkline' | 'strideRows'> {
  let rest = budget - PANEL_FIXED_ROWS;
  let curveRows = Math.min(3, Math.max(1, rest));
  rest -= curveRows;
  const showSparkline = rest >= 1;
  if (showSparkline) rest -= 1;
  let strideRows = 0;
  if (rest >= 3) {
    strideRows = Math.min(3, rest - 1);
    rest -= strideRows + 1;
  }
  const moreCurve = Math.max(0, Math.min(rest, 13));
  curveRows += moreCurve;
  rest -= moreCurve;
  if (strideRows > 0 && rest > 0) strideRows += Math.min(rest, 7);
  return { curveRows, showSparkline, strideRows };
}

/**
 * `rows`: rows the dashboard may use; `reservedRows`: rows taken outside the panels (status, alerts,
 * replay bar, prompt, footer).
 */
export function chooseLayout(columns: number, rows: number, muscleCount: number, reservedRows: number): Layout {
  const count = Math.max(1, muscleCount);
  const fit = Math.max(1, Math.floor(columns / MIN_PANEL_COLS));
  const panelsPerRow = Math.min(count, fit);
  const panelRowCount = Math.ceil(count / panelsPerRow);
  const budget = Math.floor((rows - reservedRows) / panelRowCount);
  if (count > 1 && budget < PANEL_FIXED_ROWS + 1) {
    return { panelsPerRow: 1, panelCols: Math.max(20, columns), compact: true, ...fillPanel(rows - reservedRows - (count - 1)) };
  }
  return { panelsPerRow, panelCols: Math.max(20, Math.floor(columns / panelsPerRow)), compact: false, ...fillPanel(budget) };
}
