/** The one-line input that asks the sarcomere length assumed at the current posture. */
import { Box, Text } from 'ink';
import { fixed } from './format.ts';
import type { Theme } from './theme.ts';

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

export default function CalibratePrompt({ muscle, typed, defaultUm, problem = null, theme, columns }: Props) {
  return (
    <Box flexDirection="column" width={columns}>
      <Text wrap="truncate-end">
        <Text {...theme.role('focus')}>{`calibrate ${muscle} from its last 3 s: sarcomere length at this posture `}</Text>
        <Text inverse>{` ${typed === '' ? fixed(defaultUm, 1) : typed} `}</Text>
        <Text> µm</Text>
        <Text {...theme.role('label')}>{`  (Enter applies${typed === '' ? ` ${fixed(defaultUm, 1)}` : ''}, Esc cancels)`}</Text>
      </Text>
      {problem === null ? null : (
        <Text wrap="truncate-end" {...theme.role('warning')}>
          {problem}
        </Text>
      )}
    </Box>
  );
}

/** Reads the typed length: a number of µm in the plausible range, or a message saying what is accepted. */
export function parseCalibrationUm(
  typed: string,
  defaultUm: number,
  range: { readonly min: number; readonly max: number },
): { readonly ok: true; readonly um: number } | { readonly ok: false; readonly problem: string } {
  const text = typed.trim();
  if (text === '') return { ok: true, um: defaultUm };
  const um = Number(text);
  if (!Number.isFinite(um) || um < range.min || um > range.max) {
    return {
      ok: false,
      problem: `"${text}" is not a usable sarcomere length: type a number of µm from ${range.min} to ${range.max} (e.g. 2.7), or Esc to cancel`,
    };
  }
  return { ok: true, um };
}
