/**
 * A file's size and SHA-256, read as a stream (a day-long table is never held in memory): what a
 * summary's provenance and a calibration's source say of the files they came from.
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';

export interface FileDigest {
  readonly path: string;
  readonly bytes: number;
  /** 64 lower-case hex digits. */
  readonly sha256: string;
}

/** The file's SHA-256 and size; rejects when it cannot be read. */
export function fileDigest(path: string): Promise<FileDigest> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    let bytes = 0;
    createReadStream(path)
      .on('data', (chunk) => {
        hash.update(chunk);
        bytes += chunk.length;
      })
      .on('error', reject)
      .on('end', () => resolve({ path, bytes, sha256: hash.digest('hex') }));
  });
}

/** Each file's size and SHA-256, one file after another; rejects when one cannot be read. */
export async function fileDigests(paths: readonly string[]): Promise<FileDigest[]> {
  const out: FileDigest[] = [];
  for (const path of paths) out.push(await fileDigest(path));
  return out;
}
