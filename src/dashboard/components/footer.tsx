/** The keys that work here, and the last short message (marker placed, calibration asked…). */
import { Box, Text } from 'ink';
import { memo } from 'react';
import type { KeyHelp } from '../view/keys.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly keys: readonly KeyHelp[];
  readonly theme: Theme;
  readonly columns: number;
  /** @default null */
  readonly flash?: string | null;
  /** Keys cannot be read here (standard input is not a terminal). @default false */
  readonly noKeys?: boolean;
}

function Footer({ keys, theme, columns, flash = null, noKeys = false }: Props) {
  if (noKeys) {
    return (
      <Box width={columns}>
        <Text wrap="truncate-end" {...theme.role('label')}>
          no keys: standard input is not a terminal (Ctrl+C stops)
        </Text>
      </Box>
    );
  }
  if (flash !== null) {
    // A message for the person wins the line for a moment; help stays one key away.
    return (
      <Box width={columns}>
        <Text wrap="truncate-end">
          <Text {...theme.role('flash')}>{flash}</Text>
          <Text {...theme.role('label')}>{'   '}</Text>
          <Text {...theme.role('key')}>?</Text>
          <Text {...theme.role('label')}> help</Text>
        </Text>
      </Box>
    );
  }
  return (
    <Box width={columns}>
      <Text wrap="truncate-end">
        {keys.map((k, i) => (
          <Text key={k.keys}>
            {i === 0 ? '' : '  '}
            <Text {...theme.role('key')}>{k.keys}</Text>
            <Text {...theme.role('label')}>{` ${k.short}`}</Text>
          </Text>
        ))}
      </Text>
    </Box>
  );
}

/** Memoized: drawn again only when a prop changes (the dashboard keeps its props' identities while nothing changed). */
export default memo(Footer);
