import fc from 'fast-check';
import { lastValueFrom, toArray } from 'rxjs';
import { afterAll, describe, expect, it } from 'vitest';
import { fileSource } from '../../adapters/file-source.ts';
import { readLineBytes, readLines } from '../../adapters/read-lines.ts';
import { parseNdjsonLine } from '../../adapters/ndjson.ts';
import { createCsvParser } from '../../adapters/csv.ts';
import { tooLongRejection } from '../../adapters/parse-record.ts';
import type { Batch, Frame } from '../../src/trial/records.ts';
import { tempDir } from './invented-trial.ts';

const tmp = tempDir();
afterAll(() => tmp.remove());

/** Invented lines: common samples, odd but valid ones, bad ones, blank ones, long ones, non-ASCII ones. */
const ndjsonLine = fc.oneof(
  { weight: 6, arbitrary: fc.tuple(fc.integer({ min: 0, max: 9999 }), fc.constantFrom('calf', 'thigh', 'muscle with a long name', 'größe'), fc.integer({ min: 1, max: 99_999 })).map(([t, m, f]) => `{"t":${t / 100},"muscle":"${m}","fascicle_mm":${f / 1000},"pennation_deg":18.5,"quality":0.9}`) },
  { weight: 1, arbitrary: fc.constantFrom('{"t":1,"event":"foot_strike","side":"left"}', '{"t": 1, "muscle": "calf", "fascicle_mm": 50}', '{"t":1,"muscle":"calf","fascicle_mm":-2}', '{"t":1,"marker":"é"}', '', '   ', '\t', '\u00a0', 'not json', '\ufeff{"t":0,"muscle":"calf","fascicle_mm":50}', `{"t":1,"note":"${'x'.repeat(300)}"}`) },
  { weight: 1, arbitrary: fc.string({ maxLength: 30 }) },
);
const csvLine = fc.oneof(
  { weight: 6, arbitrary: fc.tuple(fc.integer({ min: 0, max: 9999 }), fc.constantFrom('calf', 'thigh', 'größe'), fc.integer({ min: 1, max: 99_999 })).map(([t, m, f]) => `${t / 100},${m},${f / 1000},18.5,0.9,,`) },
  { weight: 1, arbitrary: fc.constantFrom('1,,,,,foot_strike,left', '', ' ', 'time_s,muscle,fascicle_mm,pennation_deg,quality,event,side', '1,"calf, left",50,,,,', `1,${'x'.repeat(300)},50,,,,`) },
  { weight: 1, arbitrary: fc.string({ maxLength: 30 }) },
);
const ending = fc.constantFrom('\n', '\r\n', '\n\n');

/** What fileSource must give: the text lines of readLines, each read by the text parser. */
async function reference(path: string, csv: boolean, options: { chunkBytes: number; maxLineBytes: number }): Promise<Frame[]> {
  const batches = await lastValueFrom(readLines(path, options).pipe(toArray()));
  const parse = csv ? createCsvParser() : (text: string, line: number): Frame[] => [parseNdjsonLine(text, line)];
  const frames: Frame[] = [];
  for (const b of batches) {
    b.texts.forEach((text, i) => {
      const line = b.lineNumbers[i] as number;
      const over = b.overLongBytes[i] as number;
      frames.push(...(over > 0 ? [tooLongRejection(line, over, options.maxLineBytes, text)] : parse(text, line)));
    });
  }
  return frames;
}

describe('fileSource reading lines from their bytes', () => {
  for (const [format, line, header] of [
    ['ndjson', ndjsonLine, '{"format":"lengthwise-stream","version":1}'],
    ['csv', csvLine, 'time_s,muscle,fascicle_mm,pennation_deg,quality,event,side'],
  ] as const) {
    it(`gives the frames of the text reading for any ${format} file, chunk size and line cap`, async () => {
      let run = 0;
      await fc.assert(
        fc.asyncProperty(
          fc.array(fc.tuple(line, ending), { maxLength: 60 }),
          fc.boolean(),
          fc.integer({ min: 1, max: 400 }),
          fc.constantFrom(120, 1024 * 1024),
          async (lines, lastEnding, chunkBytes, maxLineBytes) => {
            const body = lines.map(([l, e], i) => (i < lines.length - 1 || lastEnding ? l + e : l)).join('');
            const path = tmp.file(`bytes-${run++}.${format}`, `${header}\n${body}`);
            const options = { chunkBytes, maxLineBytes };
            const frames = (await lastValueFrom(fileSource(path, options).pipe(toArray()))).flat();
            expect(frames).toEqual(await reference(path, format === 'csv', options));
          },
        ),
        { numRuns: 150 },
      );
    });
  }

  it('keeps the batches of the text reading: the same line numbers in the same batches', async () => {
    const lines = Array.from({ length: 2500 }, (_, i) => `{"t":${i},"muscle":"calf","fascicle_mm":50}`);
    const path = tmp.file('batches.ndjson', `\n${lines.join('\n')}\n`);
    const bytes = await lastValueFrom(readLineBytes(path, { batchLines: 1000, chunkBytes: 4096 }).pipe(toArray()));
    const texts = await lastValueFrom(readLines(path, { batchLines: 1000, chunkBytes: 4096 }).pipe(toArray()));
    expect(bytes.map((b) => b.lineNumbers)).toEqual(texts.map((b) => b.lineNumbers));
    const decoded = bytes.flatMap((b) => b.texts.map((t, i) => t ?? (b.buffers[i] as Buffer).toString('utf8', b.starts[i], b.ends[i])));
    expect(decoded).toEqual(texts.flatMap((b) => [...b.texts]));
    const batches: Batch[] = await lastValueFrom(fileSource(path, { batchLines: 1000 }).pipe(toArray()));
    expect(batches.map((b) => b.length)).toEqual([1000, 1000, 500]);
  });
});
