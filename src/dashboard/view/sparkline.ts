/** A one-row sparkline of recent values in eighth blocks, scaled to the shown window's own range. */

const LEVELS = ['▁', '▂', '▃', '▄', '▅', '▆', '▇', '█'] as const;

export interface Sparkline {
  readonly text: string;
  /** Range of the shown values (NaN when none). */
  readonly min: number;
  readonly max: number;
}

/** The newest `widthCols` finite values, oldest on the left; a flat window draws at mid height. */
export function sparkline(values: readonly number[], widthCols: number): Sparkline {
  const width = Math.floor(widthCols);
  const shown = width > 0 ? values.filter(Number.isFinite).slice(-width) : [];
  if (shown.length === 0) return { text: '', min: Number.NaN, max: Number.NaN };
  const min = Math.min(...shown);
  const max = Math.max(...shown);
  const span = max - min;
  const text = shown
    .map((v) => {
      const level = span > 0 ? Math.round(((v - min) / span) * (LEVELS.length - 1)) : 3;
      return LEVELS[level] ?? '▄';
    })
    .join('');
  return { text, min, max };
}
