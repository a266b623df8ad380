/** Number formatting for the screen and the status line: fixed decimals, units beside, "–" for unknown. */

export const NO_VALUE = '–';

/** `value` with `digits` decimals, or "–" when not finite. */
export function fixed(value: number, digits: number): string {
  return Number.isFinite(value) ? value.toFixed(digits) : NO_VALUE;
}

/** Signed fixed, with a true minus sign so columns line up: "+12.0" / "−3.4". */
export function signed(value: number, digits: number): string {
  if (!Number.isFinite(value)) return NO_VALUE;
  const text = Math.abs(value).toFixed(digits);
  if (Number(text) === 0) return ` ${text}`;
  return `${value < 0 ? '−' : '+'}${text}`;
}

/** Elapsed seconds as m:ss.s (or h:mm:ss past an hour). */
export function elapsed(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return NO_VALUE;
  const totalTenths = Math.floor(seconds * 10);
  const tenths = totalTenths % 10;
  const totalS = Math.floor(totalTenths / 10);
  const s = totalS % 60;
  const m = Math.floor(totalS / 60) % 60;
  const h = Math.floor(totalS / 3600);
  if (h > 0) return `${h}:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')}`;
  return `${m}:${String(s).padStart(2, '0')}.${tenths}`;
}

/** Percent with no decimals: 0.634 → "63%". */
export function percent(fraction: number): string {
  return Number.isFinite(fraction) ? `${Math.round(fraction * 100)}%` : NO_VALUE;
}

/** Shortens text to `width` characters, keeping its end (file paths keep their name): "…/trials/walk.ndjson". */
export function keepEnd(text: string, width: number): string {
  if (width <= 0) return '';
  if (text.length <= width) return text;
  if (width === 1) return '…';
  return `…${text.slice(text.length - (width - 1))}`;
}

/** Wall-clock time of day as HH:MM:SS (local time). */
export function clockTime(date: Date): string {
  const two = (n: number): string => String(n).padStart(2, '0');
  return `${two(date.getHours())}:${two(date.getMinutes())}:${two(date.getSeconds())}`;
}
