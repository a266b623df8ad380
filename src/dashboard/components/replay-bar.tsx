/** Progress through a replayed trial and its speed. */
import { Box, Text } from 'ink';
import { memo } from 'react';
import type { ReplayStatus } from '../../trial/run-status.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly replay: ReplayStatus;
  readonly theme: Theme;
  readonly columns: number;
  /** Whether + and - change the speed here. @default false */
  readonly speedKeys?: boolean;
}

function ReplayBar({ replay, theme, columns, speedKeys = false }: Props) {
  const progress = Math.min(1, Math.max(0, Number.isFinite(replay.progress) ? replay.progress : 0));
  const speed = replay.speed === 'max' ? 'max speed' : `${replay.speed}×`;
  const tail = ` ${String(Math.round(progress * 100)).padStart(3)}%  ${speed}${speedKeys ? ' (+/-)' : ''}`;
  const barCols = Math.max(4, columns - 'replay '.length - tail.length - 1);
  const filled = Math.round(progress * barCols);
  return (
    <Box width={columns}>
      <Text wrap="truncate-end">
        <Text {...theme.role('label')}>replay </Text>
        <Text {...theme.role('focus')}>{'█'.repeat(filled)}</Text>
        <Text {...theme.role('label')}>{'░'.repeat(barCols - filled)}</Text>
        <Text>{tail}</Text>
      </Text>
    </Box>
  );
}

/** Memoized: drawn again only when a prop changes (the dashboard keeps its props' identities while nothing changed). */
export default memo(ReplayBar);
