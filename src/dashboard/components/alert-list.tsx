/** The alerts, one row each (a connection's may take two), critical first; alerts beyond `maxRows` are counted, not shown. */
import { Box, Text } from 'ink';
import { memo } from 'react';
import { alertLines, type Alert } from '../view/alerts.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly alerts: readonly Alert[];
  readonly theme: Theme;
  readonly columns: number;
  /** @default 3 */
  readonly maxRows?: number;
}

function AlertList({ alerts, theme, columns, maxRows = 3 }: Props) {
  if (alerts.length === 0) return null;
  const overflow = alerts.length > maxRows;
  const shown = overflow ? alerts.slice(0, maxRows - 1) : alerts;
  return (
    <Box flexDirection="column" width={columns}>
      {shown.flatMap((alert) =>
        alertLines(alert, columns).map((line, row) => (
          <Text key={`${alert.kind}:${alert.muscle ?? ''}:${row}`} wrap="truncate-end" {...theme.role(alert.severity)}>
            {line}
          </Text>
        )),
      )}
      {overflow ? <Text {...theme.role('warning')}>{` ! and ${alerts.length - shown.length} more alerts `}</Text> : null}
    </Box>
  );
}

/** Memoized: drawn again only when a prop changes (the dashboard keeps its props' identities while nothing changed). */
export default memo(AlertList);
