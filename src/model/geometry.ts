/**
 * The sarcomere force–length relation from filament geometry: active force follows the overlap of thin
 * (actin) and thick (myosin) filaments (Gordon, Huxley & Julian 1966, J Physiol 184:170–192).
 */
import type { RegionKey } from './regions.ts';

/** Filament lengths of one species or muscle, all in µm. */
export interface FilamentGeometry {
  /** Thick (myosin) filament length. */
  readonly thickUm: number;
  /** One thin (actin) filament, from the Z-disc edge to its tip. */
  readonly thinUm: number;
  /** The bare zone at the thick filament's middle, free of myosin heads. */
  readonly bareZoneUm: number;
  /** Z-disc width. */
  readonly zDiscUm: number;
  /**
   * Sarcomere length where the steep ascending limb reaches zero force. Geometry alone does not give it
   * (it reflects thick filaments pressed against the Z-discs), so it is an empirical value of the preset.
   */
  readonly steepZeroUm: number;
  /** Relative force at the break between the steep and the shallow ascending limb. */
  readonly steepBreakForce: number;
}

/** Breakpoints of the piecewise-linear curve, µm, ascending order. */
export interface ForceLengthCurve {
  readonly geometry: FilamentGeometry;
  /** Force is zero at and below this length. */
  readonly steepZeroUm: number;
  /** Thick filaments reach the Z-discs: the steep limb begins below this length. */
  readonly steepBreakUm: number;
  /** Thin filaments meet at the sarcomere's centre: the shallow limb begins below this length. */
  readonly plateauStartUm: number;
  /** Thin filament tips reach the bare zone's edge: the descending limb begins above this length. */
  readonly plateauEndUm: number;
  /** Thin filaments leave the thick filaments: no overlap, no active force, at and above this length. */
  readonly descendingZeroUm: number;
  readonly steepBreakForce: number;
}

/** Breakpoints computed from filament lengths, so a user's own filament lengths give their own curve. */
export function curveFromGeometry(g: FilamentGeometry): ForceLengthCurve {
  const thinSpanUm = 2 * g.thinUm + g.zDiscUm;
  return {
    geometry: g,
    steepZeroUm: g.steepZeroUm,
    steepBreakUm: g.thickUm + g.zDiscUm,
    plateauStartUm: thinSpanUm,
    plateauEndUm: thinSpanUm + g.bareZoneUm,
    descendingZeroUm: g.thickUm + thinSpanUm,
    steepBreakForce: g.steepBreakForce,
  };
}

/** Middle of the plateau (µm): the length of peak active force. */
export function plateauMiddleUm(c: ForceLengthCurve): number {
  return (c.plateauStartUm + c.plateauEndUm) / 2;
}

/** Relative active force (0–1) of the piecewise-linear geometric curve at a sarcomere length. */
export function geometricForce(c: ForceLengthCurve, sarcomereUm: number): number {
  if (!(sarcomereUm > c.steepZeroUm) || sarcomereUm >= c.descendingZeroUm) return 0;
  if (sarcomereUm < c.steepBreakUm) {
    return (c.steepBreakForce * (sarcomereUm - c.steepZeroUm)) / (c.steepBreakUm - c.steepZeroUm);
  }
  if (sarcomereUm < c.plateauStartUm) {
    return (
      c.steepBreakForce +
      ((1 - c.steepBreakForce) * (sarcomereUm - c.steepBreakUm)) / (c.plateauStartUm - c.steepBreakUm)
    );
  }
  if (sarcomereUm <= c.plateauEndUm) return 1;
  return (c.descendingZeroUm - sarcomereUm) / (c.descendingZeroUm - c.plateauEndUm);
}

/** Region of the geometric curve at a sarcomere length. Regions always come from the geometry. */
export function regionAt(c: ForceLengthCurve, sarcomereUm: number): RegionKey {
  if (sarcomereUm <= c.steepZeroUm) return 'too_short';
  if (sarcomereUm < c.steepBreakUm) return 'steep_ascending';
  if (sarcomereUm < c.plateauStartUm) return 'shallow_ascending';
  if (sarcomereUm <= c.plateauEndUm) return 'plateau';
  if (sarcomereUm < c.descendingZeroUm) return 'descending';
  return 'no_overlap';
}
