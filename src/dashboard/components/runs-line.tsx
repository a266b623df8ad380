/**
 * One line of toned runs (a row of the curve drawing). Only its stretches of ink are written: a blank
 * run (spaces the theme gives no style) is what a cell left alone holds already, so it is left to the
 * layout, and Ink has fewer characters to measure and style each frame; the screen is the same.
 * Memoized: a line given the same runs array (the drawings keep theirs) is not rendered again.
 */
import { Box, Text } from 'ink';
import { memo, useMemo } from 'react';
import { rowCols, stretches, type Run } from '../view/curve-drawing.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly runs: readonly Run[];
  readonly theme: Theme;
}

function RunsLine({ runs, theme }: Props) {
  const inked = useMemo(() => stretches(runs, (run) => Object.keys(theme.tone(run.tone)).length === 0 && run.text.trim() === ''), [runs, theme]);
  return (
    <Box height={1} width={rowCols(runs)} flexShrink={0}>
      {inked.map((stretch) => (
        <Box key={stretch.col} position="absolute" marginLeft={stretch.col}>
          <Text>
            {stretch.runs.map((run, i) => (
              <Text key={i} {...theme.tone(run.tone)}>
                {run.text}
              </Text>
            ))}
          </Text>
        </Box>
      ))}
    </Box>
  );
}

export default memo(RunsLine);
