/** The one-line input that asks the sarcomere length assumed at the current posture. */
import { Box, Text } from 'ink';
import { memo } from 'react';
import { fixed } from '../../output/format.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly muscle: string;
  /** What has been typed so far. */
  readonly typed: string;
  readonly defaultUm: number;
  /** A message about the last attempt (null: none). @default null */
  readonly problem?: string | null;
  readonly theme: Theme;
  readonly columns: number;
}

function CalibratePrompt({ muscle, typed, defaultUm, problem = null, theme, columns }: Props) {
  return (
    <Box flexDirection="column" width={columns}>
      <Text wrap="truncate-end">
        <Text {...theme.role('focus')}>{`calibrate ${muscle} from the last 3 s: SL at this posture `}</Text>
        <Text inverse>{` ${typed === '' ? fixed(defaultUm, 1) : typed} `}</Text>
        <Text> µm</Text>
        <Text {...theme.role('label')}>{'   Enter applies · Esc cancels'}</Text>
      </Text>
      {problem === null ? null : (
        <Text wrap="truncate-end" {...theme.role('warning')}>
          {problem}
        </Text>
      )}
    </Box>
  );
}

/** Memoized: drawn again only when a prop changes (the dashboard keeps its props' identities while nothing changed). */
export default memo(CalibratePrompt);
