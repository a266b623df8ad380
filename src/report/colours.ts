/**
 * The report's colours, chosen for this tool: the regions keep the dashboard's hues (grey, magenta,
 * yellow, green, cyan, grey) in softer tones that print well on white.
 */
import { REGION_KEYS, type RegionKey } from '../model/regions.ts';

export const REGION_COLOUR: Readonly<Record<RegionKey, string>> = {
  too_short: '#8f8f8f',
  steep_ascending: '#b5579b',
  shallow_ascending: '#d9a93a',
  plateau: '#4f9d5d',
  descending: '#3d9db3',
  no_overlap: '#5e5e5e',
};

/** The region colours in REGION_KEYS order, for a plotting scale's range. */
export const REGION_RANGE: readonly string[] = REGION_KEYS.map((k) => REGION_COLOUR[k]);

export const INK = '#23262b';
export const MUTED = '#6b7079';
/** The gait-cycle band and mean line. */
export const CYCLE_BAND = '#7d8fb3';
export const CYCLE_LINE = '#2b3f6b';
/** Strides left out of the trial figures for too much gap time. */
export const FLAGGED = '#d0612a';

/**
 * The conditions of a study, in its order: hues told apart with the common colour-vision deficiencies
 * (after Okabe & Ito's colour-universal-design set, 2008, from memory), dark enough to read as lines
 * over the region bands, then repeated.
 */
export const CONDITION_RANGE: readonly string[] = ['#0072b2', '#d55e00', '#3b3b3b', '#009e73', '#cc79a7', '#e69f00', '#56b4e9', '#8c564b'];
