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
}

/**
 * `reservedRows`: rows taken outside the panels (status bar, alerts, replay bar, footer).
 */
export function chooseLayout(columns: number, rows: number, muscleCount: number, reservedRows: number): Layout {
  const count = Math.max(1, muscleCount);
  const fit = Math.max(1, Math.floor(columns / MIN_PANEL_COLS));
  const panelsPerRow = Math.min(count, fit);
  const panelRowCount = Math.ceil(count / panelsPerRow);
  const panelCols = Math.max(20, Math.floor(columns / panelsPerRow));
  const budget = Math.floor((rows - reservedRows) / panelRowCount);

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
  const moreCurve = Math.max(0, Math.min(rest, 9));
  curveRows += moreCurve;
  rest -= moreCurve;
  if (strideRows > 0 && rest > 0) strideRows += Math.min(rest, 3);
  return { panelsPerRow, panelCols, curveRows, showSparkline, strideRows };
}
