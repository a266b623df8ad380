/**
 * A WebSocket address as it may be shown: a token in its query (`?token=…`, any letter case) and a
 * password in it (`ws://user:PASSWORD@host`) are replaced by `***`, so a secret given on the command
 * line never reaches a screen, a summary, a report or a log.
 */

/** The text that stands in for a secret. */
export const REDACTED = '***';

/** Query keys whose values are secrets. */
const SECRET_KEYS = new Set(['token', 'access_token']);

/** `url` with its secrets replaced by `***` (unchanged when it has none); text that is not a URL is returned with every `token=…` value replaced. */
export function redactUrl(url: string): string {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    return url.replace(/((?:^|[?&;\s])(?:access_)?token=)[^&#\s"]*/gi, `$1${REDACTED}`);
  }
  const keys = [...new Set([...parsed.searchParams.keys()].filter((key) => SECRET_KEYS.has(key.toLowerCase())))];
  // Nothing secret: the address as given, letter for letter.
  if (parsed.password === '' && keys.length === 0) return url;
  if (parsed.password !== '') parsed.password = REDACTED;
  for (const key of keys) parsed.searchParams.set(key, REDACTED);
  return parsed.href;
}
