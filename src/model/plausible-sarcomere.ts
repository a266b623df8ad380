/**
 * The sarcomere lengths skeletal muscle can have. An estimate outside them says that the calibration,
 * the device's units or the tracking is wrong, not the muscle; a sarcomere length given for a calibration
 * must lie within them too.
 */

/**
 * Plausible sarcomere lengths, µm, ends included. The bounds are common practice, no source; they hold,
 * with a margin on both sides, every length at which the tool's force–length curves give force: 1.27–4.24
 * µm for human muscle (Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457) and 1.27–3.65 µm for
 * frog fibres (Gordon, Huxley & Julian 1966, J Physiol 184:170–192).
 */
export const PLAUSIBLE_SARCOMERE_UM = { min: 1, max: 5 } as const;

/** A range of sarcomere lengths, µm, ends included (a settings file may narrow or widen the plausible one). */
export interface SarcomereRange {
  readonly min: number;
  readonly max: number;
}

/** True for a sarcomere length (µm) within the range (by default PLAUSIBLE_SARCOMERE_UM); false for NaN and infinities. */
export function isPlausibleSarcomereUm(um: number, range: SarcomereRange = PLAUSIBLE_SARCOMERE_UM): boolean {
  return um >= range.min && um <= range.max;
}
