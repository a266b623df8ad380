/** One muscle in one line, for the muscles without a panel when the terminal is small. */
import { Text } from 'ink';
import { memo } from 'react';
import { REGION_LABEL } from '../../model/regions.ts';
import { fixed } from '../../output/format.ts';
import type { Theme } from '../view/theme.ts';
import type { MuscleView } from '../view/view-model.ts';

export interface Props {
  readonly muscle: MuscleView;
  readonly theme: Theme;
}

function MuscleLine({ muscle, theme }: Props) {
  const s = muscle.latest;
  const region = s?.region ?? null;
  return (
    <Text wrap="truncate-end">
      <Text {...theme.role('title')}>{`  ${muscle.name}`}</Text>
      <Text {...theme.role('label')}>{` ${muscle.side ?? 'side unknown'}  SL `}</Text>
      <Text bold>{fixed(s?.sarcomereUm ?? Number.NaN, 2)}</Text>
      <Text> µm  </Text>
      <Text {...theme.region(region)} bold>
        {region === null ? '–' : REGION_LABEL[region].toUpperCase()}
      </Text>
      <Text {...theme.role('label')}>{'  force '}</Text>
      <Text>{fixed(s?.force ?? Number.NaN, 2)}</Text>
      <Text {...theme.role('label')}>{'  quality '}</Text>
      <Text {...(s?.lowQuality === true ? theme.role('warning') : {})}>{fixed(s?.quality ?? Number.NaN, 2)}</Text>
    </Text>
  );
}

/** Memoized: drawn again only when a prop changes (a new frame, or a new theme). */
export default memo(MuscleLine);
