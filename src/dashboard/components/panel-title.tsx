/**
 * A panel's first line: the muscle, its side and its calibration. Its props are plain values that
 * change only with the muscle's calibration or the focus, so it is not drawn again frame after frame.
 */
import { Text } from 'ink';
import { memo } from 'react';
import type { Theme } from '../view/theme.ts';

export interface Props {
  /** The muscle's name, marked when focused. */
  readonly title: string;
  /** The side, and the separator before the calibration when there is one. */
  readonly side: string;
  /** What the calibration is ('' when there is no room for it). */
  readonly calibration: string;
  /** A calibration that is not a guess shows as a label; a guess or none as a warning. */
  readonly calibrated: boolean;
  readonly focused: boolean;
  readonly theme: Theme;
}

function PanelTitle({ title, side, calibration, calibrated, focused, theme }: Props) {
  return (
    <Text wrap="truncate-end">
      <Text {...(focused ? theme.role('focus') : theme.role('title'))}>{title}</Text>
      <Text {...theme.role('label')}>{side}</Text>
      <Text {...(calibrated ? theme.role('label') : theme.role('warning'))}>{calibration}</Text>
    </Text>
  );
}

export default memo(PanelTitle);
