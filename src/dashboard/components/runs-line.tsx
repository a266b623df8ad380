/**
 * One line of toned runs (a row of the curve drawing), written as few characters and styles as it
 * takes (see row-stretches.ts): blank runs are left to the layout, neighbours in the same style are one
 * text. Memoized: a line given the same runs array (the drawings keep theirs) is not rendered again.
 */
import { Box, Text } from 'ink';
import { memo, useMemo } from 'react';
import { rowCols, type Run } from '../view/curve-drawing.ts';
import { rowStretches } from '../view/row-stretches.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly runs: readonly Run[];
  readonly theme: Theme;
}

function RunsLine({ runs, theme }: Props) {
  const stretches = useMemo(() => rowStretches(runs, (tone) => theme.tone(tone)), [runs, theme]);
  return (
    <Box height={1} width={rowCols(runs)} flexShrink={0}>
      {stretches.map(({ col, pieces }) => (
        <Box key={col} position="absolute" marginLeft={col}>
          {pieces.length === 1 ? (
            <Text {...pieces[0]?.style}>{pieces[0]?.text}</Text>
          ) : (
            <Text>
              {pieces.map((piece, i) => (
                <Text key={i} {...piece.style}>
                  {piece.text}
                </Text>
              ))}
            </Text>
          )}
        </Box>
      ))}
    </Box>
  );
}

export default memo(RunsLine);
