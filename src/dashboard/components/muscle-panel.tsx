/**
 * One muscle: where it is on its force–length curve now and over this stride, the numbers behind it,
 * recent sarcomere lengths, and its last strides. The parts that change less often than the numbers
 * (the title, the curve's rows, the marker's column, the stride table) are memoized components.
 */
import { Box, Text } from 'ink';
import { memo } from 'react';
import { REGION_LABEL } from '../../model/regions.ts';
import CurvePlot from './curve-plot.tsx';
import { fixed, percent, signed } from '../../output/format.ts';
import type { Layout } from '../view/layout.ts';
import PanelTitle from './panel-title.tsx';
import { sparkline } from '../view/sparkline.ts';
import StrideTable from './stride-table.tsx';
import type { Theme } from '../view/theme.ts';
import type { MuscleView } from '../view/view-model.ts';

export interface Props {
  readonly muscle: MuscleView;
  readonly layout: Layout;
  readonly theme: Theme;
  /** The muscle keys such as c act on. @default false */
  readonly focused?: boolean;
}

/** Inner width of a panel: its columns less border and padding. */
export function innerCols(panelCols: number): number {
  return Math.max(10, panelCols - 4);
}

/** How the panel names the muscle's calibration, in full and short, for narrow panels. */
function calibrationText(source: string | null, method: string | null): { readonly full: string; readonly short: string } {
  if (method === 'architecture_prior' && source !== 'baseline') return { full: 'prior from published architecture', short: 'prior' };
  switch (source) {
    case null:
      return { full: 'calibration pending', short: 'pending' };
    case 'baseline':
      return { full: 'uncalibrated', short: 'uncal.' };
    case 'runtime':
      return { full: 'calibrated here', short: 'cal. here' };
    default:
      return { full: `calibrated: ${source}`, short: `cal. ${source}` };
  }
}

function MusclePanel({ muscle, layout, theme, focused = false }: Props) {
  const width = innerCols(layout.panelCols);
  const s = muscle.latest;
  const sl = s?.sarcomereUm ?? Number.NaN;
  const region = s?.region ?? null;
  const side = muscle.side === null ? 'side unknown' : muscle.sideSource === 'assumed' ? `${muscle.side}?` : muscle.side;
  const probabilities = muscle.regionProbability;
  const regionP = region === null ? undefined : probabilities?.[region];
  const spark = layout.showSparkline ? sparkline(muscle.history, Math.max(0, width - 18)) : null;
  const calibrated = muscle.calibrationSource !== null && muscle.calibrationSource !== 'baseline';
  const regionText =
    region === null ? '' : `${REGION_LABEL[region].toUpperCase()}${regionP === undefined || !Number.isFinite(regionP) ? '' : ` ${percent(regionP)}`}`;
  const forceLv = s?.forceLv ?? Number.NaN;
  const capacityLabel = 'capacity';
  // The title depends on the muscle and its calibration only, so it stays still while the region changes.
  const titleText = `${focused ? '▸ ' : ''}${muscle.name}`;
  const room = Math.max(0, width - titleText.length - side.length - 4);
  const cal = calibrationText(muscle.calibrationSource, muscle.calibrationMethod);
  const optimum = muscle.optimum;
  const calText = cal.full.length <= room ? cal.full : cal.short.length <= room ? cal.short : '';
  return (
    <Box
      flexDirection="column"
      width={layout.panelCols}
      borderStyle={focused ? 'double' : 'single'}
      {...theme.border(focused)}
      paddingX={1}
    >
      <PanelTitle
        title={titleText}
        side={` ${side}${calText === '' ? '' : ' · '}`}
        calibration={calText}
        calibrated={calibrated}
        focused={focused}
        theme={theme}
      />
      <CurvePlot
        curve={muscle.curve}
        widthCols={width}
        heightRows={layout.curveRows}
        sarcomereUm={sl}
        current={muscle.current}
        previous={muscle.previous}
        theme={theme}
      />
      <Text wrap="truncate-end">
        <Text {...theme.role('label')}>SL </Text>
        <Text bold>{fixed(sl, 2)}</Text>
        <Text> µm  </Text>
        <Text {...theme.region(region)} bold>
          {regionText === '' ? '–' : regionText}
        </Text>
      </Text>
      <Text wrap="truncate-end">
        <Text {...theme.role('label')}>{'force '}</Text>
        <Text bold>{fixed(s?.force ?? Number.NaN, 2)}</Text>
        {Number.isFinite(forceLv) ? (
          <>
            <Text {...theme.role('label')}>{`  ${capacityLabel} `}</Text>
            <Text>{fixed(forceLv, 2)}</Text>
          </>
        ) : null}
        {optimum === null ? null : (
          <>
            <Text {...theme.role('label')}>{'  L0 '}</Text>
            <Text>{fixed(optimum.um, 2)}</Text>
            <Text {...theme.role('label')}>{` at activation ${fixed(optimum.activation, 2)}`}</Text>
          </>
        )}
      </Text>
      <Text wrap="truncate-end">
        <Text {...theme.role('label')}>fascicle </Text>
        <Text>{fixed(Number.isFinite(s?.smoothMm) ? (s?.smoothMm ?? Number.NaN) : (s?.fascicleMm ?? Number.NaN), 1)} mm</Text>
        <Text {...theme.role('label')}>{'  pennation '}</Text>
        <Text>{fixed(s?.pennationDeg ?? Number.NaN, 1)}°</Text>
      </Text>
      <Text wrap="truncate-end">
        <Text {...theme.role('label')}>velocity </Text>
        <Text>{signed(s?.velocityMmS ?? Number.NaN, 1)} mm/s</Text>
        <Text {...theme.role('label')}>{'  quality '}</Text>
        <Text {...(s?.lowQuality === true ? theme.role('warning') : {})}>{fixed(s?.quality ?? Number.NaN, 2)}</Text>
      </Text>
      {spark === null ? null : (
        <Text wrap="truncate-end">
          <Text {...theme.role('label')}>SL recent </Text>
          <Text {...theme.region(region)}>{spark.text.padEnd(Math.max(0, width - 18))}</Text>
          <Text {...theme.role('label')}>{` ${fixed(spark.min, 1)}–${fixed(spark.max, 1)}`}</Text>
        </Text>
      )}
      <StrideTable strides={muscle.strides} rows={layout.strideRows} theme={theme} estimated={muscle.stridesEstimated} wide={width >= 48} />
    </Box>
  );
}

/** Memoized: a key press or a message drawn elsewhere on the screen does not draw the panels again. */
export default memo(MusclePanel);
