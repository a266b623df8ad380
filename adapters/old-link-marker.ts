/**
 * Session logs written before a lost connection had a record of its own carry it as a marker:
 * `[link] disconnected: DETAIL` for every muscle, or `[link] disconnected ["calf","shin"]: DETAIL` for
 * the muscles one device of several carried. The reader turns such a marker into the Disconnection it
 * stood for, so an old log replays as it always did; nothing writes this text any more.
 */
import type { Disconnection, Marker } from '../src/trial/records.ts';

/** The text an old link marker starts with; a marker that starts with it is read as a Disconnection. */
export const OLD_LINK_MARKER_PREFIX = '[link] disconnected';

/** The Disconnection an old link marker's text stands for, or null when the text is not one. */
export function oldLinkMarker(tS: number, text: string, line: number): Disconnection | null {
  if (!text.startsWith(OLD_LINK_MARKER_PREFIX)) return null;
  const rest = text.slice(OLD_LINK_MARKER_PREFIX.length);
  if (rest.startsWith(':')) return { kind: 'disconnection', tS, muscles: null, detail: detailAfter(rest, 1), line };
  if (!rest.startsWith(' [')) return null;
  // The list is JSON; its end is the first "]:" before which the text parses as a list of names.
  for (let end = rest.indexOf(']:'); end >= 0; end = rest.indexOf(']:', end + 1)) {
    let value: unknown;
    try {
      value = JSON.parse(rest.slice(1, end + 1));
    } catch {
      continue;
    }
    if (Array.isArray(value) && value.every((v) => typeof v === 'string')) {
      return { kind: 'disconnection', tS, muscles: value as string[], detail: detailAfter(rest, end + 2), line };
    }
  }
  return null;
}

/** A marker as read, or the Disconnection it stands for in a log written before disconnections had their own line. */
export function markerFrame(tS: number, text: string, line: number): Marker | Disconnection {
  return oldLinkMarker(tS, text, line) ?? { kind: 'marker', tS, marker: text, line };
}

function detailAfter(rest: string, at: number): string {
  return rest.charCodeAt(at) === 32 ? rest.slice(at + 1) : rest.slice(at);
}
