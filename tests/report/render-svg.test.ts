import { describe, expect, it } from 'vitest';
import type { TopLevelSpec } from 'vega-lite';
import { renderSvg } from '../../src/report/render-svg.ts';

const line: TopLevelSpec = {
  width: 120,
  height: 60,
  data: { values: [{ x: 1, y: 1 }, { x: 2, y: 3 }] },
  mark: 'line',
  encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } },
};

describe('renderSvg', () => {
  it('renders a vega-lite spec to an SVG ready to inline: labelled, no namespace attributes', async () => {
    const warnings: string[] = [];
    const svg = await renderSvg(line, 'a "line" <plot>', warnings);
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
    expect(svg).toContain('role="img" aria-label="a &quot;line&quot; &lt;plot>"');
    expect(svg).not.toContain('xmlns');
    expect(svg).toContain('<path');
    expect(warnings).toEqual([]);
  });

  it('renders an empty data set as axes alone', async () => {
    const svg = await renderSvg({ ...line, data: { values: [] } }, 'empty');
    expect(svg.startsWith('<svg')).toBe(true);
  });

  it("keeps the plotting libraries' warnings instead of printing them", async () => {
    const warnings: string[] = [];
    const clash: TopLevelSpec = {
      layer: [
        { ...line, encoding: { ...line.encoding, color: { datum: 'a', scale: { domain: ['a'], range: ['#111111'] } } } },
        { ...line, encoding: { ...line.encoding, color: { datum: 'b', scale: { domain: ['b'], range: ['#222222'] } } } },
      ],
    } as TopLevelSpec;
    await renderSvg(clash, 'clash', warnings);
    expect(warnings.join('\n')).toMatch(/Conflicting scale property/);
  });
});
