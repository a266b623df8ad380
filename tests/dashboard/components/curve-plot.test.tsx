import '../force-color.ts';
import { afterEach, describe, expect, it } from 'vitest';
import { Box, Text } from 'ink';
import CurvePlot from '../../../src/dashboard/components/curve-plot.tsx';
import { curveLayers, drawCurve, FILLED_REGIONS, REGION_FILL, type LengthRange, type Run } from '../../../src/dashboard/view/curve-drawing.ts';
import type { RegionKey } from '../../../src/model/regions.ts';
import RunsLine from '../../../src/dashboard/components/runs-line.tsx';
import { createTheme, type Theme } from '../../../src/dashboard/view/theme.ts';
import { speciesCurve } from '../../../src/model/species.ts';
import { COLOUR_SGR, plain, renderScreen, tick, type Screen } from '../terminal-double.ts';
import { toneRuns } from '../fixtures.ts';

const human = speciesCurve('human');
const frog = speciesCurve('frog');

const screens: Screen[] = [];
afterEach(() => {
  for (const s of screens.splice(0)) s.instance.unmount();
});

async function frameOf(tree: Parameters<typeof renderScreen>[0]): Promise<string> {
  const screen = renderScreen(tree, 100, 30);
  screens.push(screen);
  await tick(5);
  return screen.lastFrame();
}

interface Case {
  readonly sarcomereUm: number;
  readonly current: LengthRange | null;
  readonly previous: LengthRange | null;
}

const cases: readonly Case[] = [
  { sarcomereUm: 2.72, current: { slMinUm: 2.5, slMaxUm: 3 }, previous: { slMinUm: 2.8, slMaxUm: 3.4 } },
  { sarcomereUm: 1.7, current: null, previous: null },
  { sarcomereUm: 3.9, current: { slMinUm: 3.5, slMaxUm: 3.9 }, previous: null },
  { sarcomereUm: 5.2, current: null, previous: { slMinUm: 2, slMaxUm: 2.4 } },
  { sarcomereUm: 0.9, current: null, previous: null },
  { sarcomereUm: Number.NaN, current: { slMinUm: 2.5, slMaxUm: 2.6 }, previous: null },
];

/**
 * A row drawn the way rows were drawn before blank runs were left to the layout: one text of every run,
 * each cell written. The screen drawn the new way must be this one, escape codes and all.
 */
function EveryCellRow({ runs, theme }: { readonly runs: readonly Run[]; readonly theme: Theme }) {
  return (
    <Text>
      {runs.map((run, i) => (
        <Text key={i} {...theme.tone(run.tone)}>
          {run.text}
        </Text>
      ))}
    </Text>
  );
}

function EveryCellDrawing({ rows, theme }: { readonly rows: readonly (readonly Run[])[]; readonly theme: Theme }) {
  return (
    <Box flexDirection="column">
      {rows.map((runs, row) => (
        <EveryCellRow key={row} runs={runs} theme={theme} />
      ))}
    </Box>
  );
}

/** A stride's worth of frames: the marker sweeps the axis and beyond, the stride's range grows, a stride completes. */
function sweep(): Case[] {
  const out: Case[] = [];
  let current = null as LengthRange | null;
  let previous = null as LengthRange | null;
  for (let i = 0; i <= 60; i++) {
    const sarcomereUm = i === 30 ? Number.NaN : 0.8 + i * 0.08;
    if (i === 40) {
      previous = current;
      current = null;
    }
    current = Number.isFinite(sarcomereUm)
      ? { slMinUm: Math.min(current?.slMinUm ?? sarcomereUm, sarcomereUm), slMaxUm: Math.max(current?.slMaxUm ?? sarcomereUm, sarcomereUm) }
      : current;
    out.push({ sarcomereUm, current, previous });
  }
  return out;
}

describe('CurvePlot', () => {
  for (const color of [true, false]) {
    it(`paints exactly the cells of the whole drawing, the marker laid over the kept curve rows (${color ? 'colour' : 'no colour'})`, async () => {
      const theme = createTheme(color);
      for (const curve of [human, frog]) {
        for (const c of cases) {
          for (const [widthCols, heightRows] of [[56, 6], [36, 3], [1, 1]] as const) {
            const drawing = drawCurve({ curve, widthCols, heightRows, ...c, bothChar: color ? '▀' : '█', fill: color ? 'blocks' : 'patterns' });
            const expected = await frameOf(<EveryCellDrawing rows={drawing.rows} theme={theme} />);
            const painted = await frameOf(<CurvePlot curve={curve} widthCols={widthCols} heightRows={heightRows} theme={theme} {...c} />);
            expect(painted).toBe(expected);
          }
        }
      }
      if (color) expect(await frameOf(<CurvePlot curve={human} widthCols={56} heightRows={6} theme={theme} {...cases[0]!} />)).toMatch(COLOUR_SGR);
    });

    it(`draws a run of frames, one plot redrawn frame after frame, exactly as writing every cell would (${color ? 'colour' : 'no colour'})`, async () => {
      const theme = createTheme(color);
      const plot = renderScreen(<Box />, 100, 30);
      const reference = renderScreen(<Box />, 100, 30);
      screens.push(plot, reference);
      for (const curve of [human, frog]) {
        for (const c of sweep()) {
          const drawing = drawCurve({ curve, widthCols: 38, heightRows: 5, ...c, bothChar: color ? '▀' : '█', fill: color ? 'blocks' : 'patterns' });
          // Both screens draw in debug mode: a rerender writes its frame before it returns.
          plot.instance.rerender(<CurvePlot curve={curve} widthCols={38} heightRows={5} theme={theme} {...c} />);
          reference.instance.rerender(<EveryCellDrawing rows={drawing.rows} theme={theme} />);
          expect(plot.lastFrame()).toBe(reference.lastFrame());
        }
      }
      expect(plot.out.frames.length).toBeGreaterThan(60);
    });
  }
});

describe('CurvePlot without colour', () => {
  /** The characters of each region's full cells, as painted (plain text), by region. */
  async function fullCellChars(color: boolean, curve = human): Promise<Map<RegionKey, Set<string>>> {
    const layers = curveLayers(curve, 56, 6, color ? 'blocks' : 'patterns');
    const frame = await frameOf(<CurvePlot curve={curve} widthCols={56} heightRows={6} theme={createTheme(color)} sarcomereUm={Number.NaN} current={null} previous={null} />);
    // eslint-disable-next-line no-control-regex -- colour codes are taken off to read the characters
    const rows = frame.replace(/\u001B\[[\d;]*m/g, '').split('\n');
    const chars = new Map<RegionKey, Set<string>>();
    layers.levels.forEach((levels, row) => {
      const text = [...(rows[row] ?? '')];
      levels.forEach((level, col) => {
        if (level < 8) return;
        const region = layers.regions[col] as RegionKey;
        const set = chars.get(region) ?? new Set<string>();
        set.add(text[col] ?? '');
        chars.set(region, set);
      });
    });
    return chars;
  }

  it('tells the regions apart by the fill characters of their full cells', async () => {
    for (const curve of [human, frog]) {
      const chars = await fullCellChars(false, curve);
      expect([...chars.keys()].sort()).toEqual([...FILLED_REGIONS].sort());
      for (const region of FILLED_REGIONS) expect([...(chars.get(region) ?? [])]).toEqual([REGION_FILL[region]]);
    }
    expect(new Set(FILLED_REGIONS.map((r) => REGION_FILL[r])).size).toBe(FILLED_REGIONS.length);
  });

  it('keeps full blocks in colour, where colour tells the regions apart', async () => {
    const chars = await fullCellChars(true);
    for (const region of FILLED_REGIONS) expect([...(chars.get(region) ?? [])]).toEqual(['█']);
  });

  it('keeps the curve\'s shape: the cells at its top edge stay eighth blocks', () => {
    const layers = curveLayers(human, 56, 6, 'patterns');
    const partial = layers.body.flatMap((runs) => runs.map((r) => r.text)).join('');
    expect(partial).toMatch(/[▁▂▃▄▅▆▇]/);
  });
});

describe('RunsLine', () => {
  it('writes only its stretches of ink, at their columns, and keeps the whole width', async () => {
    const theme = createTheme(true);
    // A band row: the previous stride's range, a gap, this stride's range with the marker in it.
    const runs = toneRuns(['  ', 'empty'], ['▄▄▄', 'band_previous'], [' ', 'empty'], ['▀▀', 'band_current'], ['◆', 'marker'], ['▀', 'band_current'], ['   ', 'empty']);
    const line = await frameOf(
      <Box>
        <RunsLine runs={runs} theme={theme} />
        <Text>|</Text>
      </Box>,
    );
    expect(line).toBe(await frameOf(<Box><EveryCellRow runs={runs} theme={theme} /><Text>|</Text></Box>));
    expect(plain(line)).toBe('  ▄▄▄ ▀▀◆▀   |');
    // A row with nothing to write still takes its line.
    const blank = await frameOf(
      <Box flexDirection="column">
        <RunsLine runs={[{ text: '     ', tone: 'empty' }]} theme={theme} />
        <Text>under</Text>
      </Box>,
    );
    expect(blank).toBe('\nunder');
  });
});

describe('curveLayers', () => {
  it('draws a curve once per size and gives the same drawing for the same curve and size', () => {
    const first = curveLayers(human, 56, 6);
    expect(curveLayers(human, 56, 6)).toBe(first);
    expect(curveLayers(human, 56.4, 6.2)).toBe(first);
    expect(curveLayers(human, 57, 6)).not.toBe(first);
    expect(curveLayers(human, 56, 7)).not.toBe(first);
    expect(curveLayers(frog, 56, 6)).not.toBe(first);
  });

  it('keeps the curve rows of the whole drawing when there is no marker in them', () => {
    const layers = curveLayers(human, 56, 6);
    const drawing = drawCurve({ curve: human, widthCols: 56, heightRows: 6, sarcomereUm: Number.NaN, current: null, previous: null });
    expect(drawing.rows.slice(0, 6)).toEqual(layers.body);
    expect(drawing.rows[7]).toBe(layers.axis);
  });

  it('gives the same marker column for the same column', () => {
    const layers = curveLayers(human, 56, 6);
    expect(layers.markerColumn(20)).toBe(layers.markerColumn(20));
    expect(layers.markerColumn(20)).toHaveLength(6);
  });
});
