/** Device mapping files for tests: the format line said once. */
import { writeFile } from 'node:fs/promises';

/** Writes a lengthwise-mapping (version 1) file at `path` with the given keys; gives its path. */
export async function writeMappingFile(path: string, keys: Record<string, unknown>): Promise<string> {
  await writeFile(path, JSON.stringify({ format: 'lengthwise-mapping', version: 1, ...keys }));
  return path;
}
