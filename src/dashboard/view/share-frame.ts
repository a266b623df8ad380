/**
 * A frame copied from another thread arrives as all-new objects, but the screen keeps its work by
 * identity: the curve's drawing is cached per curve object, the stride table is drawn again only for a
 * new strides array, and the replay bar only for a new replay status. `shareFrame` gives back the
 * previous frame's curve, strides and status wherever the new ones hold the same values, so a copied
 * frame costs the screen what an in-place one does.
 */
import { isDeepStrictEqual } from 'node:util';
import type { ForceLengthCurve } from '../../model/geometry.ts';
import type { TrialFrame } from './trial-frames.ts';
import type { MuscleView } from './view-model.ts';

/** Node's own deep comparison: NaN equals NaN, as the copy keeps it. */
const sameValues = isDeepStrictEqual;

export function shareFrame(previous: TrialFrame | null, next: TrialFrame): TrialFrame {
  if (previous === null) return next;
  const before = new Map<string, MuscleView>();
  for (const m of previous.view.muscles) before.set(m.name, m);
  let changed = false;
  const muscles = next.view.muscles.map((m) => {
    const was = before.get(m.name);
    if (was === undefined) return m;
    const curve: ForceLengthCurve = was.curve === m.curve || sameValues(was.curve, m.curve) ? was.curve : m.curve;
    const strides = was.strides.length === m.strides.length && sameValues(was.strides, m.strides) ? was.strides : m.strides;
    if (curve === m.curve && strides === m.strides) return m;
    changed = true;
    return { ...m, curve, strides };
  });
  const status = previous.status === next.status || sameValues(previous.status, next.status) ? previous.status : next.status;
  if (!changed && status === next.status) return next;
  return { view: changed ? { ...next.view, muscles } : next.view, status };
}
