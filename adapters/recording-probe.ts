/**
 * A quick look at a recording before a trial plays, from its first and last rows only: its first and last
 * sample times on the joint clock and the muscles its start carries. So a description whose recordings
 * do not line up is refused before anything plays, without reading the files through (a day-long table
 * costs its first rows and its last 64 KiB).
 */
import { open } from 'node:fs/promises';
import { Observable } from 'rxjs';
import type { Batch, Frame, Side } from '../src/trial/records.ts';
import { median } from '../src/model/stats.ts';
import type { DeviceMapping } from './device-mapping.ts';
import { fileSource, layoutLineReader, type SourceLayout } from './file-source.ts';

/** Samples read from a recording's start. */
export const PROBE_HEAD_SAMPLES = 2000;
/** Bytes read from a recording's end. */
export const PROBE_TAIL_BYTES = 64 * 1024;
/** Foot strikes read from an events file's start to tell a stride's length. */
const PROBE_FOOT_STRIKES = 64;

export interface RecordingProbe {
  /** First and last sample times on the joint clock (its offset added); NaN when it has none. */
  readonly firstS: number;
  readonly lastS: number;
  /** The muscles of its first rows (and, for a table with a column per muscle, of its columns). */
  readonly muscles: readonly string[];
}

/**
 * Reads the start of a file through fileSource, handing each batch to `take` until it says it has seen
 * enough; true when the file ended first. Errors as fileSource does (a file that cannot be read, a table
 * whose layout cannot be told).
 */
function readStart(source: Observable<Batch>, take: (batch: Batch) => boolean): Promise<boolean> {
  return new Promise((resolve, reject) => {
    let enough = false;
    const subscription = source.subscribe({
      next: (batch) => {
        if (enough) return;
        enough = take(batch);
        if (enough) {
          resolve(false);
          // Unsubscribed once subscribe has returned, should the batch have come during it.
          queueMicrotask(() => subscription.unsubscribe());
        }
      },
      error: (error: unknown) => reject(error instanceof Error ? error : new Error(String(error))),
      complete: () => resolve(true),
    });
    if (enough) subscription.unsubscribe();
  });
}

/** The last sample time among the file's last PROBE_TAIL_BYTES, read with the layout found at its start; NaN when none is there. */
async function lastSampleS(path: string, layout: SourceLayout, mapping: DeviceMapping | null): Promise<number> {
  const handle = await open(path, 'r');
  let text: string;
  let from: number;
  try {
    const { size } = await handle.stat();
    from = Math.max(0, size - PROBE_TAIL_BYTES);
    const buffer = Buffer.alloc(size - from);
    const { bytesRead } = await handle.read(buffer, 0, buffer.length, from);
    text = buffer.toString('utf8', 0, bytesRead);
  } finally {
    await handle.close();
  }
  const lines = text.split('\n');
  // The first piece is the end of a line begun before the window.
  if (from > 0) lines.shift();
  const read = layoutLineReader(layout, mapping);
  const out: Frame[] = [];
  let last = Number.NaN;
  for (const line of lines) {
    const row = line.endsWith('\r') ? line.slice(0, -1) : line;
    if (row.trim() === '') continue;
    out.length = 0;
    read(row, 0, out);
    for (const f of out) if (f.kind === 'sample' && !(f.tS <= last)) last = f.tS;
  }
  return last;
}

/** The first and last sample times and the first muscles of a recording, read through its mapping, on the joint clock. */
export async function probeRecording(path: string, mapping: DeviceMapping | null, offsetS: number): Promise<RecordingProbe> {
  let layout: SourceLayout | null = null;
  const muscles = new Set<string>();
  let firstS = Number.NaN;
  let lastS = Number.NaN;
  let samples = 0;
  const whole = await readStart(fileSource(path, { mapping, onLayout: (l) => (layout = l) }), (batch) => {
    for (const f of batch) {
      if (f.kind !== 'sample') continue;
      muscles.add(f.muscle);
      if (Number.isNaN(firstS)) firstS = f.tS;
      if (!(f.tS <= lastS)) lastS = f.tS;
      samples++;
    }
    return samples >= PROBE_HEAD_SAMPLES;
  });
  const found = layout as SourceLayout | null;
  if (found !== null && found.format === 'csv') for (const m of found.plan.wide) muscles.add(m.muscle);
  if (!whole && found !== null) {
    const tail = await lastSampleS(path, found, mapping);
    if (tail > lastS) lastS = tail;
  }
  return { firstS: firstS + offsetS, lastS: lastS + offsetS, muscles: [...muscles] };
}

/**
 * One stride's length from the start of an events file: the median time between successive foot strikes
 * of one side among its first foot strikes; null when it has fewer than two of a side (or cannot be read:
 * the trial says why when it reads the file).
 */
export async function probeStrideS(path: string, mapping: DeviceMapping | null): Promise<number | null> {
  const strikes: Record<Side, number[]> = { left: [], right: [] };
  let seen = 0;
  try {
    await readStart(fileSource(path, { mapping, role: 'events' }), (batch) => {
      for (const f of batch) {
        if (f.kind !== 'event' || f.event !== 'foot_strike') continue;
        strikes[f.side].push(f.tS);
        seen++;
      }
      return seen >= PROBE_FOOT_STRIKES;
    });
  } catch {
    return null;
  }
  const intervals: number[] = [];
  for (const times of [strikes.left, strikes.right]) {
    times.sort((a, b) => a - b);
    for (let i = 1; i < times.length; i++) intervals.push((times[i] as number) - (times[i - 1] as number));
  }
  return intervals.length > 0 ? median(intervals) : null;
}
