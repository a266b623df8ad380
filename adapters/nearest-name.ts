/**
 * The nearest of the accepted names to a name that was not accepted, for messages such as
 * "`--sped`: unknown option; did you mean `--speed`?". Edit distance (Levenshtein), from a small,
 * well-kept library; a suggestion is made only when it is close enough to be a slip of the keyboard.
 */
import { distance } from 'fastest-levenshtein';

/**
 * The accepted name nearest to `given`, or null when none is near: at most 2 edits for names up to 8
 * characters, a quarter of the length beyond (so `sarcomeres_in_series_sdd` finds `sarcomeres_in_series_sd`,
 * and `colour` finds nothing among `speed, summary`). Ties go to the first in `accepted`.
 */
export function nearestName(given: string, accepted: Iterable<string>): string | null {
  const limit = Math.max(2, Math.floor(given.length / 4));
  let best: string | null = null;
  let bestDistance = Infinity;
  for (const name of accepted) {
    const d = distance(given.toLowerCase(), name.toLowerCase());
    if (d < bestDistance && d <= limit) {
      best = name;
      bestDistance = d;
    }
  }
  return best;
}

/** "; did you mean `NAME`?" when a near name exists, else "". */
export function didYouMean(given: string, accepted: Iterable<string>, quote = (name: string) => `\`${name}\``): string {
  const near = nearestName(given, accepted);
  return near === null ? '' : `; did you mean ${quote(near)}?`;
}
