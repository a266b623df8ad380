/**
 * Colours and emphasis of the dashboard, chosen for this tool. With NO_COLOR set (https://no-color.org:
 * present and not empty) no colour is used at all; bold and inverse still mark what matters.
 */
import type { RegionKey } from '../../model/regions.ts';
import type { Tone } from './curve-drawing.ts';

export interface TextStyle {
  readonly color?: string;
  readonly backgroundColor?: string;
  readonly bold?: boolean;
  readonly inverse?: boolean;
  readonly dimColor?: boolean;
}

export type Role =
  | 'critical'
  | 'warning'
  | 'frozen'
  | 'good'
  | 'label'
  | 'key'
  | 'title'
  | 'focus'
  | 'flash';

export interface Theme {
  readonly color: boolean;
  tone(tone: Tone): TextStyle;
  region(region: RegionKey | null): TextStyle;
  role(role: Role): TextStyle;
  /** Border colour of a panel (undefined: the terminal's own). */
  border(focused: boolean): { readonly borderColor?: string };
}

/** True unless NO_COLOR is set to a non-empty value. */
export function colorEnabled(env: NodeJS.ProcessEnv): boolean {
  const value = env['NO_COLOR'];
  return value === undefined || value === '';
}

const REGION_COLOR: Readonly<Record<RegionKey, string>> = {
  too_short: 'gray',
  steep_ascending: 'magenta',
  shallow_ascending: 'yellow',
  plateau: 'green',
  descending: 'cyan',
  no_overlap: 'gray',
};

const ROLE_COLOR: Readonly<Record<Role, TextStyle>> = {
  critical: { color: 'white', backgroundColor: 'red', bold: true },
  warning: { color: 'black', backgroundColor: 'yellow' },
  frozen: { color: 'black', backgroundColor: 'cyan', bold: true },
  good: { color: 'green' },
  label: { color: 'gray' },
  key: { color: 'cyan', bold: true },
  title: { bold: true },
  focus: { color: 'whiteBright', bold: true },
  flash: { color: 'cyan' },
};

const ROLE_PLAIN: Readonly<Record<Role, TextStyle>> = {
  critical: { inverse: true, bold: true },
  warning: { bold: true },
  frozen: { inverse: true, bold: true },
  good: {},
  label: {},
  key: { bold: true },
  title: { bold: true },
  focus: { bold: true },
  flash: { bold: true },
};

export function createTheme(color: boolean): Theme {
  const region = (key: RegionKey | null): TextStyle => (color && key !== null ? { color: REGION_COLOR[key] } : {});
  return {
    color,
    region,
    tone(tone: Tone): TextStyle {
      switch (tone) {
        case 'empty':
          return {};
        case 'marker':
          return color ? { color: 'whiteBright', bold: true } : { bold: true };
        case 'band_current':
          return color ? { color: 'whiteBright' } : {};
        case 'band_previous':
          return color ? { color: 'gray' } : {};
        case 'band_both':
          // Drawn as an upper half block: this stride bright above, the previous faint below.
          return color ? { color: 'whiteBright', backgroundColor: 'gray' } : {};
        case 'axis':
          return color ? { color: 'gray' } : {};
        default:
          return region(tone);
      }
    },
    role: (role) => (color ? ROLE_COLOR[role] : ROLE_PLAIN[role]),
    border: (focused) => (color ? { borderColor: focused ? 'whiteBright' : 'gray' } : {}),
  };
}
