/**
 * The marker's column laid over a curve's rows: a stem over the empty cells, a heavy line through the
 * filled area. It is drawn again only when the marker moves to another column.
 */
import { Box, Text } from 'ink';
import { memo } from 'react';
import type { CurveLayers } from '../view/curve-drawing.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly layers: CurveLayers;
  /** The marker's column, inside the drawing. */
  readonly col: number;
  readonly theme: Theme;
}

function MarkerColumn({ layers, col, theme }: Props) {
  return (
    // Laid over the curve rows at the marker's column: the rows themselves stay as drawn.
    <Box position="absolute" marginLeft={col} width={1} flexDirection="column">
      <Text {...theme.tone('marker')}>{layers.markerColumn(col).join('\n')}</Text>
    </Box>
  );
}

export default memo(MarkerColumn);
