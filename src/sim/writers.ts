/**
 * Writers of generated trials: NDJSON and the CSV variant, as strings (for tests) and streamed to disk
 * in chunks that wait for the file to drain (so a trial of millions of samples never sits in memory).
 */
import { createWriteStream } from 'node:fs';
import { once } from 'node:events';
import { finished } from 'node:stream/promises';
import { csvField, csvSampleRow } from './bad-lines.ts';
import { formatNumber } from './format-number.ts';
import { isWireEvent, isWireHeader, isWireMarker, isWireSample, type WireItem, type WireSample } from './wire.ts';

export const CSV_HEADER_ROW = 'time_s,muscle,fascicle_mm,pennation_deg,quality,event,side';

const nameJsonCache = new Map<string, string>();

function nameJson(name: string): string {
  let s = nameJsonCache.get(name);
  if (s === undefined) {
    s = JSON.stringify(name);
    if (nameJsonCache.size < 1000) nameJsonCache.set(name, s);
  }
  return s;
}

function sampleLine(s: WireSample): string {
  // Hand-built for speed; key order as JSON.stringify would give for a generated sample.
  let line = `{"t":${formatNumber(s.t)},"muscle":${nameJson(s.muscle)},"fascicle_mm":${formatNumber(s.fascicle_mm)}`;
  if (s.pennation_deg !== undefined) line += `,"pennation_deg":${formatNumber(s.pennation_deg)}`;
  if (s.quality !== undefined) line += `,"quality":${formatNumber(s.quality)}`;
  return `${line}}`;
}

function finiteSample(s: WireSample): boolean {
  return (
    Number.isFinite(s.t) &&
    Number.isFinite(s.fascicle_mm) &&
    (s.pennation_deg === undefined || Number.isFinite(s.pennation_deg)) &&
    (s.quality === undefined || Number.isFinite(s.quality))
  );
}

/** One item as an NDJSON line (no line break); a raw bad line is written as it is. */
export function ndjsonLine(item: WireItem): string {
  if (typeof item === 'string') return item;
  if (isWireSample(item) && finiteSample(item)) return sampleLine(item);
  return JSON.stringify(item);
}

/**
 * One item as a CSV row (no line break), or null for records the CSV variant has no row for (the header
 * and markers). A raw bad line is written as it is: generate with `records({ badLines: 'csv' })`.
 */
export function csvLine(item: WireItem): string | null {
  if (typeof item === 'string') return item;
  if (isWireSample(item)) return csvSampleRow(item);
  if (isWireEvent(item)) return `${formatNumber(item.t)},,,,,${item.event},${item.side}`;
  if (isWireHeader(item) || isWireMarker(item)) return null;
  return null;
}

export function toNdjson(items: Iterable<WireItem>): string {
  let out = '';
  for (const item of items) out += `${ndjsonLine(item)}\n`;
  return out;
}

export function toCsv(items: Iterable<WireItem>): string {
  let out = `${CSV_HEADER_ROW}\n`;
  for (const item of items) {
    const row = csvLine(item);
    if (row !== null) out += `${row}\n`;
  }
  return out;
}

export type WriteResult =
  | { readonly ok: true; readonly path: string; readonly lines: number; readonly bytes: number }
  | { readonly ok: false; readonly path: string; readonly problem: string };

const CHUNK_CHARS = 1 << 16;

async function writeLines(
  lines: Iterable<string | null>,
  path: string,
): Promise<WriteResult> {
  const stream = createWriteStream(path, { encoding: 'utf8' });
  let count = 0;
  let bytes = 0;
  let chunk = '';
  let failure: Error | null = null;
  // Kept so an error between two awaits is never an unhandled 'error' event; finished() reports it.
  stream.on('error', (error) => {
    failure ??= error;
  });
  try {
    for (const line of lines) {
      if (failure !== null) throw failure;
      if (line === null) continue;
      chunk += `${line}\n`;
      count++;
      if (chunk.length >= CHUNK_CHARS) {
        bytes += Buffer.byteLength(chunk);
        if (!stream.write(chunk)) await once(stream, 'drain');
        chunk = '';
      }
    }
    if (chunk.length > 0) {
      bytes += Buffer.byteLength(chunk);
      stream.write(chunk);
    }
    stream.end();
    await finished(stream);
    return { ok: true, path, lines: count, bytes };
  } catch (error) {
    stream.destroy();
    const code = (error as NodeJS.ErrnoException).code ?? (error as Error).message;
    return { ok: false, path, problem: `cannot write ${path} (${code}); check that its folder exists and is writable` };
  }
}

function* mapIter<T, R>(items: Iterable<T>, f: (x: T) => R): Generator<R, void, undefined> {
  for (const x of items) yield f(x);
}

/** Streams the items to a file as NDJSON; failures come back as data. */
export function writeNdjson(items: Iterable<WireItem>, path: string): Promise<WriteResult> {
  return writeLines(mapIter(items, ndjsonLine), path);
}

/** Streams the items to a file as CSV, header row first; the header record and markers have no row. */
export function writeCsv(items: Iterable<WireItem>, path: string): Promise<WriteResult> {
  function* rows(): Generator<string | null, void, undefined> {
    yield CSV_HEADER_ROW;
    yield* mapIter(items, csvLine);
  }
  return writeLines(rows(), path);
}

export { csvField };
