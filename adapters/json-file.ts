/** The JSON files options name (a calibration, a device mapping): read, parsed and checked the same way, and their problems said alike. */
import { readFile } from 'node:fs/promises';
import { visit } from 'jsonc-parser';
import { z } from 'zod';
import { didYouMean } from './nearest-name.ts';

type Checked = { readonly ok: true } | { readonly ok: false; readonly problems: readonly string[] };

/**
 * Reads the JSON file at `path` and checks its content with `check`. A UTF-8 byte-order mark at the start
 * is skipped (editors on some systems write one). An unreadable file, text that is not JSON (then
 * `accepted` says what is), a key given twice in one object (JSON.parse would keep the last silently) and
 * every problem `check` finds are problems that name the file; never throws.
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
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    return { ok: false, problems: [`${what} file ${path} is not valid JSON: ${(error as Error).message}`, accepted] };
  }
  const twice = duplicateKeys(text);
  if (twice.length > 0) return { ok: false, problems: twice.map((p) => `${path}: ${p}`) };
  const result = check(value);
  return result.ok ? result : { ok: false, problems: result.problems.map((p) => `${path}: ${p}`) };
}

/**
 * Keys given more than once in one object of a JSON text, one sentence each with its path and lines
 * (1-based). The text must already be valid JSON; the scanning is jsonc-parser's.
 */
export function duplicateKeys(text: string): string[] {
  const problems: string[] = [];
  const open: Map<string, number>[] = [];
  visit(text, {
    onObjectBegin: () => {
      open.push(new Map());
    },
    onObjectEnd: () => {
      open.pop();
    },
    onObjectProperty: (property, _offset, _length, startLine, _startCharacter, pathSupplier) => {
      const seen = open.at(-1);
      if (seen === undefined) return;
      const line = startLine + 1;
      const first = seen.get(property);
      if (first === undefined) {
        seen.set(property, line);
        return;
      }
      const where = keyPath([...pathSupplier(), property]);
      problems.push(`\`${where}\`: given twice (lines ${first} and ${line}); a key may appear once in its object: keep the one you mean`);
    },
  });
  return problems;
}

/** A key's path as the messages write it: `muscles.calf.method`. */
export function keyPath(path: readonly PropertyKey[]): string {
  return path.map(String).join('.');
}

/**
 * What a file's schema found wrong, one sentence per issue with the path it is at, then what is accepted.
 * An unknown key is said with its full path and the nearest accepted key, when `schema` (and the `value`
 * it was given) are passed to find the keys accepted there.
 */
export function schemaProblems(error: z.ZodError, accepted: string, schema?: z.ZodType, value?: unknown): string[] {
  // An unknown key first: it is often why an accepted one is missing (`muscle` for `muscles`).
  const issues = [...error.issues].sort((a, b) => Number(b.code === 'unrecognized_keys') - Number(a.code === 'unrecognized_keys'));
  const problems = issues.flatMap((issue) => {
    if (issue.code === 'unrecognized_keys' && schema !== undefined) {
      const known = objectKeysAt(schema, issue.path, value);
      if (known !== null) {
        return issue.keys.map((key) => {
          const where = keyPath([...issue.path, key]);
          const near = didYouMean(key, known, (name) => `\`${keyPath([...issue.path, name])}\``);
          return `\`${where}\`: unknown key${near === '' ? `; accepted here: ${known.join(', ')}` : near}`;
        });
      }
    }
    const where = issue.path.length > 0 ? keyPath(issue.path) : '(top level)';
    return [`${where}: ${issue.message}`];
  });
  return [...problems, accepted];
}

/** Looks through optional, default and nullable wrappers to the schema inside. */
function unwrap(schema: z.ZodType): z.ZodType {
  let s = schema;
  for (;;) {
    if (s instanceof z.ZodOptional || s instanceof z.ZodDefault || s instanceof z.ZodNullable) s = s.unwrap() as z.ZodType;
    else return s;
  }
}

/** The option of a discriminated union that the value's discriminator picks, or null. */
function pickOption(schema: z.ZodDiscriminatedUnion, value: unknown): z.ZodType | null {
  const key = schema.def.discriminator;
  const given = typeof value === 'object' && value !== null ? (value as Record<string, unknown>)[key] : undefined;
  for (const option of schema.options as readonly z.ZodType[]) {
    const o = unwrap(option);
    if (o instanceof z.ZodObject && (o.shape as Record<string, z.ZodType>)[key]?.safeParse(given).success === true) return o;
  }
  return null;
}

/** The keys accepted by the object schema at `path` (the value guides discriminated unions), or null when there is none. */
function objectKeysAt(schema: z.ZodType, path: readonly PropertyKey[], value: unknown): string[] | null {
  let s = schema;
  let v = value;
  for (let i = 0; ; i++) {
    s = unwrap(s);
    if (s instanceof z.ZodDiscriminatedUnion) {
      const picked = pickOption(s, v);
      if (picked === null) return null;
      s = picked;
    }
    if (i === path.length) return s instanceof z.ZodObject ? Object.keys(s.shape as object) : null;
    const key = path[i] as PropertyKey;
    if (s instanceof z.ZodObject) {
      const next = (s.shape as Record<PropertyKey, z.ZodType | undefined>)[key];
      if (next === undefined) return null;
      s = next;
    } else if (s instanceof z.ZodRecord) s = s.valueType as z.ZodType;
    else if (s instanceof z.ZodArray) s = s.element as z.ZodType;
    else return null;
    v = typeof v === 'object' && v !== null ? (v as Record<PropertyKey, unknown>)[key] : undefined;
  }
}
