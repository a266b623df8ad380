/**
 * One line of toned runs (a row of the curve drawing). Memoized: a line given the same runs array (the
 * drawings keep theirs) is not rendered again.
 */
import { Text } from 'ink';
import { memo } from 'react';
import type { Run } from '../view/curve-drawing.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly runs: readonly Run[];
  readonly theme: Theme;
}

function RunsLine({ runs, theme }: Props) {
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

export default memo(RunsLine);
