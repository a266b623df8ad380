/**
 * What a screen must write of a row of toned runs: the runs in the styles the theme gives them, each
 * group of neighbours in the same style joined into one, and the blank ones (spaces without a style)
 * left out, since a cell nothing is written to holds just that. What is left comes in stretches, each
 * with the column it starts at. Ink measures and styles every character it is given, each frame, so
 * the fewer characters and styles a row hands it, the less a frame costs; the screen is the same.
 */
import type { Run, Tone } from './curve-drawing.ts';
import type { TextStyle } from './theme.ts';

/** Text in one style. */
export interface StyledText {
  readonly text: string;
  readonly style: TextStyle;
}

export interface Stretch {
  /** Where the stretch starts: every character of a drawing is one cell wide. */
  readonly col: number;
  readonly pieces: readonly StyledText[];
}

function sameStyle(a: TextStyle, b: TextStyle): boolean {
  const keys = Object.keys(a) as (keyof TextStyle)[];
  return keys.length === Object.keys(b).length && keys.every((key) => a[key] === b[key]);
}

function blank(text: string, style: TextStyle): boolean {
  return Object.keys(style).length === 0 && text.trim() === '';
}

export function rowStretches(runs: readonly Run[], styleOf: (tone: Tone) => TextStyle): Stretch[] {
  const out: Stretch[] = [];
  let col = 0;
  let current: { col: number; pieces: { text: string; style: TextStyle }[] } | null = null;
  for (const run of runs) {
    const style = styleOf(run.tone);
    if (blank(run.text, style)) {
      current = null;
    } else if (current === null) {
      current = { col, pieces: [{ text: run.text, style }] };
      out.push(current);
    } else {
      const last = current.pieces.at(-1);
      // Neighbours in the same style are one piece.
      if (last !== undefined && sameStyle(last.style, style)) last.text += run.text;
      else current.pieces.push({ text: run.text, style });
    }
    col += run.text.length;
  }
  return out;
}
