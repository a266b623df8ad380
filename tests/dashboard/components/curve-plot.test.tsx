import '../force-color.ts';
import { afterEach, describe, expect, it } from 'vitest';
import { Box } from 'ink';
import CurvePlot from '../../../src/dashboard/components/curve-plot.tsx';
import { curveLayers, drawCurve, FILLED_REGIONS, REGION_FILL, type LengthRange } from '../../../src/dashboard/view/curve-drawing.ts';
import type { RegionKey } from '../../../src/model/regions.ts';
import RunsLine from '../../../src/dashboard/components/runs-line.tsx';
import { createTheme } from '../../../src/dashboard/view/theme.ts';
import { speciesCurve } from '../../../src/model/species.ts';
import { COLOUR_SGR, renderScreen, tick, type Screen } from '../terminal-double.ts';

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

describe('CurvePlot', () => {
  for (const color of [true, false]) {
    it(`paints exactly the cells of the whole drawing, the marker laid over the kept curve rows (${color ? 'colour' : 'no colour'})`, async () => {
      const theme = createTheme(color);
      for (const curve of [human, frog]) {
        for (const c of cases) {
          for (const [widthCols, heightRows] of [[56, 6], [36, 3], [1, 1]] as const) {
            const drawing = drawCurve({ curve, widthCols, heightRows, ...c, bothChar: color ? '▀' : '█', fill: color ? 'blocks' : 'patterns' });
            const expected = await frameOf(
              <Box flexDirection="column">
                {drawing.rows.map((runs, row) => (
                  <RunsLine key={row} runs={runs} theme={theme} />
                ))}
              </Box>,
            );
            const painted = await frameOf(<CurvePlot curve={curve} widthCols={widthCols} heightRows={heightRows} theme={theme} {...c} />);
            expect(painted).toBe(expected);
          }
        }
      }
      if (color) expect(await frameOf(<CurvePlot curve={human} widthCols={56} heightRows={6} theme={theme} {...cases[0]!} />)).toMatch(COLOUR_SGR);
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
