/** rowStretches: what a screen must write of a row, and where. */
import { describe, expect, it } from 'vitest';
import type { Run } from '../../../src/dashboard/view/curve-drawing.ts';
import { rowStretches } from '../../../src/dashboard/view/row-stretches.ts';
import { createTheme } from '../../../src/dashboard/view/theme.ts';
import { toneRuns } from '../fixtures.ts';

const runs = toneRuns(['   ', 'empty'], ['▂▇', 'steep_ascending'], ['██', 'plateau'], ['  ', 'empty'], ['◆', 'marker'], ['    ', 'empty']);

describe('rowStretches', () => {
  it('leaves out the blank runs and gives each stretch of ink its column', () => {
    const theme = createTheme(true);
    expect(rowStretches(runs, (tone) => theme.tone(tone))).toEqual([
      {
        col: 3,
        pieces: [
          { text: '▂▇', style: { color: 'magenta' } },
          { text: '██', style: { color: 'green' } },
        ],
      },
      { col: 9, pieces: [{ text: '◆', style: { color: 'whiteBright', bold: true } }] },
    ]);
  });

  it('joins neighbours in the same style, as every region is without colour', () => {
    const theme = createTheme(false);
    expect(rowStretches(runs, (tone) => theme.tone(tone))).toEqual([
      { col: 3, pieces: [{ text: '▂▇██', style: {} }] },
      { col: 9, pieces: [{ text: '◆', style: { bold: true } }] },
    ]);
  });

  it('keeps spaces that carry a style, and gives nothing for an empty or all-blank row', () => {
    const theme = createTheme(true);
    const axis: Run[] = [{ text: '  1.5   2.0 ', tone: 'axis' }];
    expect(rowStretches(axis, (tone) => theme.tone(tone))).toEqual([{ col: 0, pieces: [{ text: '  1.5   2.0 ', style: { color: 'gray' } }] }]);
    expect(rowStretches([], (tone) => theme.tone(tone))).toEqual([]);
    expect(rowStretches([{ text: '      ', tone: 'empty' }], (tone) => theme.tone(tone))).toEqual([]);
  });
});
