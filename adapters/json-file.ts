/** The JSON files options name (a calibration, a device mapping): read, parsed and checked the same way, and their problems said alike. */
import { readFile } from 'node:fs/promises';
import type { z } from 'zod';

type Checked = { readonly ok: true } | { readonly ok: false; readonly problems: readonly string[] };

/**
 * Reads the JSON file at `path` and checks its content with `check`. An unreadable file, text that is
 * not JSON (then `accepted` says what is) and every problem `check` finds are problems that name the
 * file; never throws.
 */
export async function readJsonFile<R extends Checked>(
  path: string,
  what: string,
  accepted: string,
  check: (value: unknown) => R,
): Promise<R | { readonly ok: false; readonly problems: readonly string[] }> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
    return { ok: false, problems: [`cannot read ${what} file ${path} (${code}); check the path and its permissions`] };
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    return { ok: false, problems: [`${what} file ${path} is not valid JSON: ${(error as Error).message}`, accepted] };
  }
  const result = check(value);
  return result.ok ? result : { ok: false, problems: result.problems.map((p) => `${path}: ${p}`) };
}

/** What a file's schema found wrong, one sentence per issue with the path it is at, then what is accepted. */
export function schemaProblems(error: z.ZodError, accepted: string): string[] {
  const problems = error.issues.map((issue) => {
    const where = issue.path.length > 0 ? issue.path.map(String).join('.') : '(top level)';
    return `${where}: ${issue.message}`;
  });
  return [...problems, accepted];
}
