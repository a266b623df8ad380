/**
 * Muscles' sides written as `NAME=left` or `NAME=right`, one piece per muscle: the --side option of the
 * commands and the side cell of a study manifest. Each caller words what was wrong its own way.
 */
import type { Side } from '../src/trial/records.ts';

/** What stopped the reading: a piece that is not NAME=left|right, or a muscle named a second time. */
export type NamedSidesProblem = { readonly kind: 'not_a_side'; readonly piece: string } | { readonly kind: 'twice'; readonly name: string };

/**
 * Puts each piece's side into `sides` (over any side it holds for that muscle already), each muscle at
 * most once among the pieces. The name is what comes before the last `=`; with `spaces`, spaces around
 * the name and the side are allowed. Null when every piece was read; else the first problem.
 */
export function putNamedSides(pieces: readonly string[], sides: Record<string, Side>, options: { readonly spaces: boolean }): NamedSidesProblem | null {
  const seen = new Set<string>();
  for (const piece of pieces) {
    const at = piece.lastIndexOf('=');
    const name = at > 0 ? piece.slice(0, at) : '';
    const side = at > 0 ? piece.slice(at + 1) : '';
    const nameText = options.spaces ? name.trim() : name;
    const sideText = options.spaces ? side.trim() : side;
    if (nameText === '' || (sideText !== 'left' && sideText !== 'right')) return { kind: 'not_a_side', piece };
    if (seen.has(nameText)) return { kind: 'twice', name: nameText };
    seen.add(nameText);
    sides[nameText] = sideText;
  }
  return null;
}
