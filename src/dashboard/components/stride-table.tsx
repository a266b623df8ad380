/** The last completed strides of one muscle, newest first: SL range, main region and its share. */
import { Box, Text } from 'ink';
import { memo } from 'react';
import { REGION_KEYS, REGION_LABEL, type RegionKey } from '../../model/regions.ts';
import type { StrideSummary } from '../../trial/state.ts';
import { fixed, percent } from '../../output/format.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  /** Oldest first, as in TrialState. */
  readonly strides: readonly StrideSummary[];
  readonly rows: number;
  readonly theme: Theme;
  /** Strides found from the fascicle signal, not from foot strikes: numbers are marked ≈. @default false */
  readonly estimated?: boolean;
  /** Room for the mean length and mean force columns too. @default false */
  readonly wide?: boolean;
}

/** The region the stride spent most time in, and that fraction; null when no time was covered. */
export function mainRegion(stride: StrideSummary): { readonly region: RegionKey; readonly fraction: number } | null {
  let best: { region: RegionKey; fraction: number } | null = null;
  for (const region of REGION_KEYS) {
    const fraction = stride.regionFraction[region];
    if (fraction > 0 && (best === null || fraction > best.fraction)) best = { region, fraction };
  }
  return best;
}

function StrideTable({ strides, rows, theme, estimated = false, wide = false }: Props) {
  if (rows <= 0) return null;
  const shown = strides.slice(-rows).reverse();
  return (
    <Box flexDirection="column">
      <Text {...theme.role('label')} wrap="truncate-end">
        {`${'#'.padStart(3)} ${'SL µm'.padEnd(9)} ${'main region'.padEnd(17)} ${'time'.padStart(4)}${wide ? `  ${'mean'.padStart(4)}  force` : ''}`}
      </Text>
      {shown.length === 0 ? <Text {...theme.role('label')}>no completed stride yet</Text> : null}
      {shown.map((s) => {
        const main = mainRegion(s);
        return (
          <Text key={s.index} wrap="truncate-end">
            <Text>{`${`${estimated ? '≈' : ''}${s.index + 1}`.padStart(3)} ${`${fixed(s.slMinUm, 2)}–${fixed(s.slMaxUm, 2)}`.padEnd(9)} `}</Text>
            <Text {...theme.region(main?.region ?? null)}>{(main === null ? '–' : REGION_LABEL[main.region]).padEnd(17)}</Text>
            <Text>{` ${(main === null ? '–' : percent(main.fraction)).padStart(4)}`}</Text>
            {wide ? <Text>{`  ${fixed(s.slMeanUm, 2)}  ${fixed(s.forceMean, 2).padStart(5)}`}</Text> : null}
          </Text>
        );
      })}
    </Box>
  );
}

/** Memoized: drawn again only when a prop changes (the dashboard keeps its props' identities while nothing changed). */
export default memo(StrideTable);
