/** Regions of the force–length curve, from shortest to longest sarcomere length. Keys are stable. */
export const REGION_KEYS = [
  'too_short',
  'steep_ascending',
  'shallow_ascending',
  'plateau',
  'descending',
  'no_overlap',
] as const;

export type RegionKey = (typeof REGION_KEYS)[number];

/** Plain-words names for screens and reports. */
export const REGION_LABEL: Readonly<Record<RegionKey, string>> = {
  too_short: 'too short',
  steep_ascending: 'steep ascending',
  shallow_ascending: 'shallow ascending',
  plateau: 'plateau',
  descending: 'descending',
  no_overlap: 'no overlap',
};

/** Index of a region in REGION_KEYS; lets accumulators keep fractions in a flat Float64Array. */
export function regionIndex(region: RegionKey): number {
  return REGION_KEYS.indexOf(region);
}

/** A record with 0 for every region; the shape of every region_fraction in the outputs. */
export function zeroRegionRecord(): Record<RegionKey, number> {
  return {
    too_short: 0,
    steep_ascending: 0,
    shallow_ascending: 0,
    plateau: 0,
    descending: 0,
    no_overlap: 0,
  };
}
