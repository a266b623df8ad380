/**
 * Paints a curve drawing (see curve-drawing.ts): regions in their colours (without colour, in their
 * fill characters), the marker bright. The curve
 * rows and the axis are drawn once per curve and size and never repainted; the marker's column is laid
 * over them (drawn again when it moves), and the band row is drawn again only when the columns it
 * covers change.
 */
import { Box } from 'ink';
import { useRef } from 'react';
import { bandKey, bandRow, curveLayers, markerRawCol, type CurveDrawingInput, type Run } from '../view/curve-drawing.ts';
import MarkerColumn from './marker-column.tsx';
import RunsLine from './runs-line.tsx';
import type { Theme } from '../view/theme.ts';

/** What the drawing is of; the theme chooses its fill and the character where both strides' ranges meet. */
export interface Props extends Omit<CurveDrawingInput, 'bothChar' | 'fill'> {
  readonly theme: Theme;
}

export default function CurvePlot({ curve, widthCols, heightRows, sarcomereUm, current, previous, theme }: Props) {
  // Without colour, the regions are told apart by their fill characters.
  const layers = curveLayers(curve, widthCols, heightRows, theme.color ? 'blocks' : 'patterns');
  const markerRaw = markerRawCol(sarcomereUm, layers);
  const bothChar = theme.color ? '▀' : '█';
  const key = `${bandKey(layers, markerRaw, current, previous)}|${bothChar}`;
  const band = useRef<{ readonly layers: object; readonly key: string; readonly runs: readonly Run[] } | null>(null);
  if (band.current?.layers !== layers || band.current.key !== key) {
    band.current = { layers, key, runs: bandRow(layers, markerRaw, current, previous, bothChar) };
  }
  const inArea = markerRaw !== null && markerRaw >= 0 && markerRaw < layers.widthCols;
  return (
    <Box flexDirection="column">
      {layers.body.map((runs, row) => (
        <RunsLine key={row} runs={runs} theme={theme} />
      ))}
      {inArea ? <MarkerColumn layers={layers} col={markerRaw} theme={theme} /> : null}
      <RunsLine runs={band.current.runs} theme={theme} />
      <RunsLine runs={layers.axis} theme={theme} />
    </Box>
  );
}
