/**
 * The marker a live session writes when a connection is lost. It travels in the data (and so in the
 * session log), which lets every replay of that log restart its filters where the live session did.
 */
export const LINK_MARKER_PREFIX = '[link] disconnected';

/**
 * `[link] disconnected: DETAIL` for every muscle (one peer), or `[link] disconnected ["calf","shin"]:
 * DETAIL` for the muscles that connection carried (one of several devices).
 */
export function linkMarkerText(muscles: readonly string[] | null, detail: string): string {
  const text = detail.replace(/[\r\n]+/g, ' ');
  return muscles === null ? `${LINK_MARKER_PREFIX}: ${text}` : `${LINK_MARKER_PREFIX} ${JSON.stringify(muscles)}: ${text}`;
}
