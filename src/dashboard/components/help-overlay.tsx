/** The help screen: every key, and how to read a panel. */
import { Box, Text } from 'ink';
import { memo } from 'react';
import { REGION_KEYS, REGION_LABEL } from '../../model/regions.ts';
import { FILLED_REGIONS, MARKER_IN_BAND, MARKER_LEFT, MARKER_RIGHT, MARKER_STEM, REGION_FILL } from '../view/curve-drawing.ts';
import type { RegionKey } from '../../model/regions.ts';
import type { KeyHelp } from '../view/keys.ts';
import type { Theme } from '../view/theme.ts';

export interface Props {
  readonly keys: readonly KeyHelp[];
  readonly theme: Theme;
  readonly columns: number;
}

/** A region's swatch before its name: a block in its colour, or without colour its fill character; none for a region with no area. */
function swatch(region: RegionKey, theme: Theme): string {
  if (!(FILLED_REGIONS as readonly RegionKey[]).includes(region)) return '';
  return `${theme.color ? '█' : REGION_FILL[region]} `;
}

function HelpOverlay({ keys, theme, columns }: Props) {
  return (
    <Box flexDirection="column" paddingX={1} width={Math.min(columns, 100)}>
      <Text {...theme.role('title')} wrap="truncate-end">
        keys (? or Esc closes this help)
      </Text>
      {keys
        .filter((k) => k.keys !== '?')
        .map((k) => (
          <Text key={k.keys} wrap="truncate-end">
            <Text {...theme.role('key')}>{k.keys.padEnd(8)}</Text>
            <Text>{k.does}</Text>
          </Text>
        ))}
      <Text {...theme.role('title')}>reading a panel</Text>
      <Text wrap="truncate-end">{`${MARKER_STEM} ${MARKER_IN_BAND}  sarcomere length now (${MARKER_LEFT} ${MARKER_RIGHT}: off the axis)`}</Text>
      <Text wrap="truncate-end">
        <Text {...theme.tone('band_current')}>▀</Text>
        {"  this stride's range   "}
        <Text {...theme.tone('band_previous')}>▄</Text>
        {"  the previous stride's   "}
        <Text {...theme.tone('band_both')}>{theme.color ? '▀' : '█'}</Text>
        {'  both'}
      </Text>
      <Text wrap="truncate-end">
        {'regions: '}
        {REGION_KEYS.slice(0, 3).map((r, i) => (
          <Text key={r}>
            {i === 0 ? '' : ' · '}
            <Text {...theme.region(r)}>{`${swatch(r, theme)}${REGION_LABEL[r]}`}</Text>
          </Text>
        ))}
      </Text>
      <Text wrap="truncate-end">
        {'         '}
        {REGION_KEYS.slice(3).map((r, i) => (
          <Text key={r}>
            {i === 0 ? '' : ' · '}
            <Text {...theme.region(r)}>{`${swatch(r, theme)}${REGION_LABEL[r]}`}</Text>
          </Text>
        ))}
      </Text>
      <Text wrap="truncate-end">force: from length alone (0–1)   capacity: with force–velocity too</Text>
      <Text wrap="truncate-end">velocity: + lengthening, − shortening   %: the region's probability</Text>
      <Text wrap="truncate-end">≈ before a stride: estimated from the fascicle signal, no foot strikes</Text>
    </Box>
  );
}

/** Memoized: drawn again only when a prop changes (the dashboard keeps its props' identities while nothing changed). */
export default memo(HelpOverlay);
