/** Paints a curve drawing (see curve-drawing.ts): regions in their colours, the marker bright. */
import { Box, Text } from 'ink';
import { drawCurve, type LengthRange } from './curve-drawing.ts';
import type { ForceLengthCurve } from '../model/geometry.ts';
import type { Theme } from './theme.ts';

export interface Props {
  readonly curve: ForceLengthCurve;
  readonly widthCols: number;
  readonly heightRows: number;
  /** NaN: no marker. */
  readonly sarcomereUm: number;
  readonly current: LengthRange | null;
  readonly previous: LengthRange | null;
  readonly theme: Theme;
}

export default function CurvePlot({ curve, widthCols, heightRows, sarcomereUm, current, previous, theme }: Props) {
  const drawing = drawCurve({ curve, widthCols, heightRows, sarcomereUm, current, previous, bothChar: theme.color ? '▀' : '█' });
  return (
    <Box flexDirection="column">
      {drawing.rows.map((runs, row) => (
        <Text key={row}>
          {runs.map((run, i) => (
            <Text key={i} {...theme.tone(run.tone)}>
              {run.text}
            </Text>
          ))}
        </Text>
      ))}
    </Box>
  );
}
