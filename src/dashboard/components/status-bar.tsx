/** The top two lines: where the data comes from and whether it can be trusted right now. */
import { Box, Text } from 'ink';
import { elapsed, fixed, keepEnd } from '../../output/format.ts';
import type { RunStatus } from '../../trial/run-status.ts';
import { connectionText } from '../../output/status-line.ts';
import type { Theme } from '../view/theme.ts';
import type { TrialView } from '../view/view-model.ts';

export interface Props {
  readonly title: string;
  readonly view: TrialView;
  readonly status: RunStatus;
  readonly theme: Theme;
  readonly frozen: boolean;
  readonly columns: number;
}

const FROZEN = ' FROZEN ';
const CALIBRATED = 'calibrated';
const UNCALIBRATED = ' UNCALIBRATED ';
/** Before any muscle's calibration is known: neither claim is made. */
const PENDING = 'calibration pending';
const ENDED = ' · trial ended';

/** The connection in a few words; the alert line says the rest. */
function connectionShort(status: RunStatus): string | null {
  const c = status.connection;
  if (c === undefined) return null;
  if (c.state === 'reconnecting') return c.retryInS === undefined ? 'reconnecting' : `reconnecting in ${Math.max(0, Math.ceil(c.retryInS))} s`;
  if (c.state === 'connecting') return c.retryInS === undefined ? 'connecting' : `not connected, trying again in ${Math.max(0, Math.ceil(c.retryInS))} s`;
  return connectionText(status);
}

function calibrationWord(calibrated: boolean | null): string {
  return calibrated === null ? PENDING : calibrated ? CALIBRATED : UNCALIBRATED;
}

export default function StatusBar({ title, view, status, theme, frozen, columns }: Props) {
  const connection = connectionShort(status);
  const source = status.sourceLabel ?? view.source;
  const elapsedText = elapsed(view.elapsedS);
  // What must always show (calibration, time) is laid out first; the source takes what is left.
  const right =
    2 + (frozen ? FROZEN.length + 1 : 0) + calibrationWord(view.calibrated).length + 5 + elapsedText.length + (view.ended ? ENDED.length : 0);
  const connectionCols = connection === null ? 0 : 3 + connection.length;
  const titleText = title.length + connectionCols + right <= columns ? title : `${title.slice(0, Math.max(4, columns - connectionCols - right - 1))}…`;
  const left = titleText.length + connectionCols;
  const sourceRoom = columns - left - right - 3;
  const sourceText = source === '' || title.includes(source) || sourceRoom < 8 ? '' : keepEnd(source, sourceRoom);
  const rate = Number.isFinite(view.samplesPerS) ? `${fixed(view.samplesPerS, 0)} samples/s` : '– samples/s';
  const rejected =
    view.rejected === 0 ? '0 rejected' : `${view.rejected} rejected${view.topReason === null ? '' : ` (most ${view.topReason.reason})`}`;
  const samplesText = `${view.accepted} samples`;
  const lowText = view.lowQuality > 0 ? ` (${view.lowQuality} low quality)` : '';
  const logRoom = columns - (rate.length + 3 + samplesText.length + lowText.length + 3 + rejected.length + ' · log '.length);
  const connectionStyle =
    status.connection?.state === 'reconnecting' || (status.connection?.state === 'connecting' && status.connection.retryInS !== undefined)
      ? theme.role('critical')
      : status.connection?.state === 'connecting'
        ? theme.role('label')
        : theme.role('good');
  return (
    <Box flexDirection="column" width={columns}>
      <Box>
        <Text wrap="truncate-end">
          <Text {...theme.role('title')}>{titleText}</Text>
          {sourceText === '' ? null : (
            <>
              <Text {...theme.role('label')}> · </Text>
              <Text>{sourceText}</Text>
            </>
          )}
          {connection === null ? null : (
            <>
              <Text {...theme.role('label')}> · </Text>
              <Text {...connectionStyle}>{connection}</Text>
            </>
          )}
          <Text>{'  '}</Text>
          {frozen ? (
            <>
              <Text {...theme.role('frozen')}>{FROZEN}</Text>
              <Text> </Text>
            </>
          ) : null}
          {view.calibrated === null ? (
            <Text {...theme.role('label')}>{PENDING}</Text>
          ) : view.calibrated ? (
            <Text {...theme.role('good')}>{CALIBRATED}</Text>
          ) : (
            <Text {...theme.role('critical')}>{UNCALIBRATED}</Text>
          )}
          <Text {...theme.role('label')}> · t </Text>
          <Text>{elapsedText}</Text>
          {view.ended ? <Text {...theme.role('label')}>{ENDED}</Text> : null}
        </Text>
      </Box>
      <Box>
        <Text wrap="truncate-end">
          <Text>{rate}</Text>
          <Text {...theme.role('label')}> · </Text>
          <Text>{samplesText}</Text>
          {lowText === '' ? null : <Text {...theme.role('label')}>{lowText}</Text>}
          <Text {...theme.role('label')}> · </Text>
          <Text {...(view.rejected > 0 ? theme.role('warning') : {})}>{rejected}</Text>
          {status.logPath === undefined || logRoom < 10 ? null : (
            <>
              <Text {...theme.role('label')}> · log </Text>
              <Text>{keepEnd(status.logPath, logRoom)}</Text>
            </>
          )}
        </Text>
      </Box>
    </Box>
  );
}
