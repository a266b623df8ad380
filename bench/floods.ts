/**
 * Floods that look legitimate, each run by the command in a fresh process as users run it, with its
 * peak RSS (the process's maxRSS, all threads, written by a small preload at exit):
 *
 * - replays of files that make up a new muscle name for every sample, repeat one sample time over and
 *   over (a stuck clock), or jump the clock far ahead once;
 * - live sessions (`live --listen`) fed from this process over 127.0.0.1: a 256 KiB array of bad
 *   elements plus thousands of one-byte bad messages, and a device that makes up 3 000 muscle names;
 *   here the session log's size against the bytes sent counts too.
 *
 * `--bin PATH` measures another build of the command (an older one, for before/after figures).
 */
import { createWriteStream } from 'node:fs';
import { readFile, rm, stat } from 'node:fs/promises';
import { join } from 'node:path';
import { WebSocket } from 'ws';
import { startWithPeakRss as start, writePeakRssPreload } from './peak-rss.ts';
import { BIN } from './fresh-process.ts';

export interface FloodResult {
  readonly name: string;
  /** What the input is, in a few words. */
  readonly what: string;
  readonly inputBytes: number;
  readonly exitCode: number | null;
  readonly peakRssMb: number;
  readonly ms: number;
  /** The session log's size, for live floods. */
  readonly logBytes?: number;
  readonly summaryBytes?: number;
  /** accepted / rejected from the summary, or what went wrong. */
  readonly outcome: string;
}

async function outcomeOf(summaryPath: string, code: number | null, stderr: string): Promise<{ outcome: string; bytes: number }> {
  try {
    const text = await readFile(summaryPath, 'utf8');
    const s = JSON.parse(text) as { frames: { accepted: number; rejected: number; rejected_by_reason: Record<string, number> }; muscles: object };
    const reasons = Object.entries(s.frames.rejected_by_reason).map(([r, n]) => `${r} ${n}`).join(', ');
    return { outcome: `${s.frames.accepted} accepted, ${s.frames.rejected} rejected (${reasons}), ${Object.keys(s.muscles).length} muscles`, bytes: text.length };
  } catch {
    const last = stderr.trim().split('\n').filter((l) => l.trim() !== '').slice(-1)[0] ?? '';
    return { outcome: `no summary (exit ${code}): ${last.slice(0, 160)}`, bytes: 0 };
  }
}

/** Writes lines to a file as a stream (never all in memory at once). */
async function writeLines(path: string, lines: Iterable<string>): Promise<number> {
  const out = createWriteStream(path);
  let bytes = 0;
  for (const line of lines) {
    bytes += line.length + 1;
    if (!out.write(`${line}\n`)) await new Promise<void>((resolve) => out.once('drain', () => resolve()));
  }
  await new Promise<void>((resolve) => out.end(() => resolve()));
  return bytes;
}

function* manyNames(n: number): Iterable<string> {
  for (let i = 0; i < n; i++) yield `{"t":${i / 100},"muscle":"m${i}","fascicle_mm":50}`;
}

function* stuckClock(n: number): Iterable<string> {
  for (let i = 0; i < n; i++) yield '{"t":5,"muscle":"calf","fascicle_mm":50}';
}

function* jumpAhead(jumpS: number): Iterable<string> {
  yield '{"t":0,"muscle":"calf","fascicle_mm":50}';
  for (let i = 0; i < 3000; i++) yield `{"t":${jumpS + i / 100},"muscle":"calf","fascicle_mm":${(55 - 6 * Math.cos((2 * Math.PI * i) / 110)).toFixed(2)}}`;
}

async function replayFlood(bin: string, dir: string, name: string, what: string, lines: Iterable<string>): Promise<FloodResult> {
  const input = join(dir, `${name}.ndjson`);
  const inputBytes = await writeLines(input, lines);
  const summaryPath = join(dir, `${name}.summary.json`);
  const run = start(bin, dir, name, ['replay', input, '--speed', 'max', '--plain', '--summary', summaryPath]);
  const { exitCode, ms, peakRssMb } = await run.ended;
  const { outcome, bytes } = await outcomeOf(summaryPath, exitCode, run.stderr);
  await rm(input, { force: true });
  return { name, what, inputBytes, exitCode, peakRssMb, ms, summaryBytes: bytes, outcome };
}

function until(check: () => boolean, timeoutMs: number, what: string): Promise<void> {
  const end = Date.now() + timeoutMs;
  return new Promise((resolve, reject) => {
    const look = (): void => {
      if (check()) resolve();
      else if (Date.now() > end) reject(new Error(`bench: timed out waiting for ${what}`));
      else setTimeout(look, 20);
    };
    look();
  });
}

async function send(ws: WebSocket, texts: Iterable<string>): Promise<number> {
  let bytes = 0;
  for (const t of texts) {
    bytes += Buffer.byteLength(t);
    await new Promise<void>((resolve, reject) => ws.send(t, (e) => (e ? reject(e) : resolve())));
  }
  return bytes;
}

async function liveFlood(bin: string, dir: string, name: string, what: string, messages: () => Iterable<string>): Promise<FloodResult> {
  const log = join(dir, `${name}.log.ndjson`);
  const summaryPath = join(dir, `${name}.summary.json`);
  const run = start(bin, dir, name, ['live', '--listen', '127.0.0.1:0', '--plain', '--log', log, '--summary', summaryPath]);
  await until(() => /listening on ws:\/\/127\.0\.0\.1:\d+/.test(run.stderr), 30_000, 'the session to listen');
  const port = /listening on ws:\/\/127\.0\.0\.1:(\d+)/.exec(run.stderr)?.[1];
  const ws = new WebSocket(`ws://127.0.0.1:${port}`);
  await new Promise((resolve, reject) => {
    ws.once('open', resolve);
    ws.once('error', reject);
  });
  const inputBytes = await send(ws, messages());
  ws.close();
  await until(() => /DISCONNECTED/.test(run.stderr), 600_000, 'the session to take every message');
  run.kill('SIGTERM');
  const { exitCode, ms, peakRssMb } = await run.ended;
  const { outcome, bytes } = await outcomeOf(summaryPath, exitCode, run.stderr);
  const logBytes = await stat(log).then((s) => s.size, () => 0);
  await rm(log, { force: true });
  return { name, what, inputBytes, exitCode, peakRssMb, ms, logBytes, summaryBytes: bytes, outcome };
}

function* badArrayAndTinyMessages(tiny: number): Iterable<string> {
  yield `[${Array.from({ length: 128 * 1024 - 1 }, () => '1').join(',')}]`;
  for (let i = 0; i < tiny; i++) yield i % 2 === 0 ? 'x' : '{}';
}

function* madeUpMuscles(n: number): Iterable<string> {
  for (let i = 0; i < n; i += 100) {
    const records: string[] = [];
    for (let j = i; j < Math.min(n, i + 100); j++) records.push(`{"t":${j / 1000},"muscle":"probe-${j}","fascicle_mm":50}`);
    yield `[${records.join(',')}]`;
  }
}

export interface FloodOptions {
  readonly quick: boolean;
  readonly bin?: string;
}

/** Every flood in turn, each in a fresh process. */
export async function measureFloods(dir: string, options: FloodOptions): Promise<FloodResult[]> {
  const bin = options.bin ?? BIN;
  await writePeakRssPreload(dir);
  const duplicates = options.quick ? 300_000 : 1_500_000;
  const results: FloodResult[] = [];
  results.push(await replayFlood(bin, dir, 'names', 'replay: a new muscle name for every one of 10 000 samples', manyNames(10_000)));
  results.push(await replayFlood(bin, dir, 'stuck-clock', `replay: one sample, then ${duplicates} more at the same time`, stuckClock(duplicates + 1)));
  results.push(await replayFlood(bin, dir, 'jump', 'replay: one sample at t=0, then 30 s of walking from t=100 000 s', jumpAhead(100_000)));
  results.push(await liveFlood(bin, dir, 'bad-elements', 'live: a 256 KiB array of 131 071 bad elements, then 20 000 one-byte bad messages', () => badArrayAndTinyMessages(20_000)));
  results.push(await liveFlood(bin, dir, 'made-up-muscles', 'live: one device, 3 000 muscle names of one sample each', () => madeUpMuscles(3000)));
  return results;
}

/** One line per flood for the bench's table. */
export function floodLines(results: readonly FloodResult[]): string[] {
  return results.map(
    (r) =>
      `flood ${r.name.padEnd(16)} peak RSS ${r.peakRssMb.toFixed(0).padStart(5)} MB, ${(r.ms / 1000).toFixed(1)} s, input ${(r.inputBytes / 1024).toFixed(0)} KiB` +
      (r.logBytes !== undefined ? `, log ${(r.logBytes / 1024).toFixed(0)} KiB` : '') +
      (r.summaryBytes !== undefined ? `, summary ${(r.summaryBytes / 1024).toFixed(0)} KiB` : '') +
      `: ${r.outcome}`,
  );
}
