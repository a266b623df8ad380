import { createReadStream } from 'node:fs';

/**
 * Lines in a file (newline bytes, plus one for a last line without one), streamed in chunks: a
 * progress bar's denominator for a replay. Resolves NaN when the file cannot be read.
 */
export function countLines(path: string): Promise<number> {
  return new Promise((resolve) => {
    let lines = 0;
    let last = 10;
    const stream = createReadStream(path, { highWaterMark: 1 << 20 });
    stream.on('data', (chunk) => {
      const bytes = chunk as Buffer;
      let i = bytes.indexOf(10);
      while (i !== -1) {
        lines++;
        i = bytes.indexOf(10, i + 1);
      }
      if (bytes.length > 0) last = bytes[bytes.length - 1] as number;
    });
    stream.on('error', () => resolve(Number.NaN));
    stream.on('end', () => resolve(last === 10 ? lines : lines + 1));
  });
}
