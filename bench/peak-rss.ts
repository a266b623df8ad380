/**
 * The command in a fresh process as users run it, with its peak RSS (the process's maxRSS, every thread):
 * a small preload, written beside the inputs, writes it at exit into the file the environment names.
 */
import { spawn } from 'node:child_process';
import { readFile, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

const PRELOAD = 'peak-rss.mjs';

/** The preload's source. */
const PEAK_RSS_PRELOAD = `import { writeFileSync } from 'node:fs';
process.on('exit', () => {
  const file = process.env.LENGTHWISE_PEAK_RSS_FILE;
  if (file) writeFileSync(file, String(process.resourceUsage().maxRSS));
});
`;

export interface Ended {
  readonly exitCode: number | null;
  /** Wall time from the start to the exit, ms. */
  readonly ms: number;
  /** The process's peak RSS, MB; NaN when the preload wrote none. */
  readonly peakRssMb: number;
}

export interface Started {
  readonly ended: Promise<Ended>;
  /** The end of what it wrote on standard output and standard error (the last 20 000 characters of each). */
  stdout: string;
  stderr: string;
  readonly kill: (signal: NodeJS.Signals) => void;
}

/** Writes the preload into `dir`, where startWithPeakRss finds it: once, before the runs. */
export function writePeakRssPreload(dir: string): Promise<void> {
  return writeFile(join(dir, PRELOAD), PEAK_RSS_PRELOAD);
}

/** Starts `bin` with `args`, the preload in `dir` writing its peak RSS into `dir`/`name`.rss. */
export function startWithPeakRss(bin: string, dir: string, name: string, args: readonly string[]): Started {
  const rssFile = join(dir, `${name}.rss`);
  const t0 = performance.now();
  const child = spawn(process.execPath, ['--import', pathToFileURL(join(dir, PRELOAD)).href, bin, ...args], {
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, NO_COLOR: '1', LENGTHWISE_PEAK_RSS_FILE: rssFile },
  });
  const exited = new Promise<number | null>((resolve) => child.on('close', (code) => resolve(code)));
  const s: Started = {
    ended: exited.then(async (exitCode) => ({ exitCode, ms: performance.now() - t0, peakRssMb: await peakMb(rssFile) })),
    stdout: '',
    stderr: '',
    kill: (signal) => child.kill(signal),
  };
  // Only the end is read; a flood's messages before it are not kept.
  child.stdout.on('data', (d: Buffer) => {
    s.stdout = (s.stdout + d.toString()).slice(-20_000);
  });
  child.stderr.on('data', (d: Buffer) => {
    s.stderr = (s.stderr + d.toString()).slice(-20_000);
  });
  return s;
}

/** The peak RSS the preload wrote, MB; NaN when it wrote none. */
async function peakMb(rssFile: string): Promise<number> {
  try {
    return Number(await readFile(rssFile, 'utf8')) / 1024;
  } catch {
    return Number.NaN;
  }
}
