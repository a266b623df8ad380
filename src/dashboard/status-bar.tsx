/** The top two lines: where the data comes from and whether it can be trusted right now. */
import { Box, Text } from 'ink';
import { elapsed, fixed, keepEnd } from './format.ts';
import type { DashboardStatus } from './status.ts';
import { connectionText } from './status-line.ts';
import type { Theme } from './theme.ts';
import type { TrialView } from './view-model.ts';

export interface Props {
  readonly title: string;
  readonly view: TrialView;
  readonly status: DashboardStatus;
  readonly theme: Theme;
  readonly frozen: boolean;
  readonly columns: number;
}

export default function StatusBar({ title, view, status, theme, frozen, columns }: Props) {
  const connection = connectionText(status);
  const source = status.sourceLabel ?? view.source;
  const rate = Number.isFinite(view.samplesPerS) ? `${fixed(view.samplesPerS, 0)} samples/s` : '– samples/s';
  const rejected =
    view.rejected === 0 ? 'no lines rejected' : `${view.rejected} rejected${view.topReason === null ? '' : ` (most ${view.topReason.reason})`}`;
  const fixedWidth = title.length + 40;
  const connectionStyle = status.connection?.state === 'reconnecting' ? theme.role('critical') : theme.role('good');
  return (
    <Box flexDirection="column" width={columns}>
      <Box>
        <Text wrap="truncate-end">
          <Text {...theme.role('title')}>{title}</Text>
          {source === '' || title.includes(source) ? null : (
            <>
              <Text {...theme.role('label')}> · </Text>
              <Text>{keepEnd(source, Math.max(8, columns - fixedWidth))}</Text>
            </>
          )}
          {connection === null ? null : (
            <>
              <Text {...theme.role('label')}> · </Text>
              <Text {...connectionStyle}>{connection}</Text>
            </>
          )}
          <Text {...theme.role('label')}> · t </Text>
          <Text>{elapsed(view.elapsedS)}</Text>
          <Text> </Text>
          {view.calibrated ? <Text {...theme.role('good')}>calibrated</Text> : <Text {...theme.role('critical')}> UNCALIBRATED </Text>}
          {frozen ? (
            <>
              <Text> </Text>
              <Text {...theme.role('frozen')}> FROZEN </Text>
            </>
          ) : null}
          {view.ended ? <Text {...theme.role('label')}> · trial ended</Text> : null}
        </Text>
      </Box>
      <Box>
        <Text wrap="truncate-end">
          <Text>{rate}</Text>
          <Text {...theme.role('label')}> · </Text>
          <Text>{view.accepted} samples</Text>
          {view.lowQuality > 0 ? <Text {...theme.role('label')}> ({view.lowQuality} low quality)</Text> : null}
          <Text {...theme.role('label')}> · </Text>
          <Text {...(view.rejected > 0 ? theme.role('warning') : {})}>{rejected}</Text>
          {status.logPath === undefined ? null : (
            <>
              <Text {...theme.role('label')}> · log </Text>
              <Text>{keepEnd(status.logPath, 40)}</Text>
            </>
          )}
        </Text>
      </Box>
    </Box>
  );
}
