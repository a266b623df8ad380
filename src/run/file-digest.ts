/** A file's SHA-256, read as a stream (a trial may be large): what provenance records of every input. */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';

/** The file's SHA-256 as 64 lower-case hex digits; rejects when it cannot be read. */
export function fileSha256(path: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    createReadStream(path)
      .on('data', (chunk) => hash.update(chunk))
      .on('error', reject)
      .on('end', () => resolve(hash.digest('hex')));
  });
}
