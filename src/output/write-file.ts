import { mkdir, rename, rm, stat, writeFile } from 'node:fs/promises';
import { dirname } from 'node:path';

export type WriteResult = { readonly ok: true; readonly path: string } | { readonly ok: false; readonly path: string; readonly message: string };

/**
 * Writes a whole file atomically (a temporary file renamed over the target), so a reader never sees half
 * a summary. Creates missing folders. A target that is there and is not a regular file (a device such as
 * /dev/null or /dev/stdout, a named pipe) is written to as it is: renaming over it would replace the
 * device itself. Failures come back as data with what to check, and leave no temporary file behind.
 */
export async function writeFileAtomic(path: string, text: string): Promise<WriteResult> {
  const tmp = `${path}.${process.pid}.tmp`;
  const existing = await stat(path).catch(() => null);
  if (existing !== null && !existing.isFile() && !existing.isDirectory()) {
    try {
      await writeFile(path, text, 'utf8');
      return { ok: true, path };
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
      return { ok: false, path, message: `could not write to ${path} (${code}); check that it can be written to` };
    }
  }
  try {
    await mkdir(dirname(path), { recursive: true });
    await writeFile(tmp, text, 'utf8');
    await rename(tmp, path);
    return { ok: true, path };
  } catch (error) {
    await rm(tmp, { force: true }).catch(() => undefined);
    const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
    return { ok: false, path, message: `could not write ${path} (${code}); check that the folder exists and is writable, and that the disk has room` };
  }
}
