import { map, type OperatorFunction } from 'rxjs';
import type { Batch, Frame, Gap } from '../trial/records.ts';
import { LINK_MARKER_PREFIX } from '../trial/link-marker.ts';

/**
 * The muscles a `[link] disconnected` marker names: null for every muscle, a list for one device's
 * muscles, or undefined when the text is not such a marker.
 */
export function linkMarkerMuscles(text: string): readonly string[] | null | undefined {
  if (!text.startsWith(LINK_MARKER_PREFIX)) return undefined;
  const rest = text.slice(LINK_MARKER_PREFIX.length);
  if (rest.startsWith(':')) return null;
  if (!rest.startsWith(' [')) return undefined;
  // The list is JSON; its end is the first "]:" before which the text parses as a list of names.
  for (let end = rest.indexOf(']:'); end >= 0; end = rest.indexOf(']:', end + 1)) {
    try {
      const value: unknown = JSON.parse(rest.slice(1, end + 1));
      if (Array.isArray(value) && value.every((v) => typeof v === 'string')) return value as string[];
    } catch {
      // Not the end of the list yet.
    }
  }
  return undefined;
}

/**
 * After each `[link] disconnected` marker, the `disconnected` Gaps the live session had, so a replay of
 * its session log restarts the filters at the same places. It runs first in every pipeline, so live,
 * replay and summarize agree; a live stream that already carries its gaps gets them twice, which changes
 * nothing (a restart of a restarted filter).
 */
export function restoreGaps(): OperatorFunction<Batch, Batch> {
  return map((batch) => {
    let out: Frame[] | null = null;
    for (let i = 0; i < batch.length; i++) {
      const f = batch[i] as Frame;
      if (out !== null) out.push(f);
      if (f.kind !== 'marker') continue;
      const muscles = linkMarkerMuscles(f.marker);
      if (muscles === undefined) continue;
      out ??= batch.slice(0, i + 1);
      const gaps: Gap[] =
        muscles === null
          ? [{ kind: 'gap', cause: 'disconnected', muscle: null, fromS: f.tS, toS: Number.NaN }]
          : muscles.map((muscle) => ({ kind: 'gap', cause: 'disconnected', muscle, fromS: f.tS, toS: Number.NaN }));
      out.push(...gaps);
    }
    return out ?? batch;
  });
}
