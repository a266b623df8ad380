/**
 * The command in a fresh process as users run it, with its peak RSS (the process's maxRSS, every thread):
 * a small preload, written beside the inputs, writes it at exit into the file the environment names.
 */
import { spawn } from 'node:child_process';
import { readFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
export const DEFAULT_BIN = join(ROOT, 'bin', 'lengthwise.js');

/** The preload's source: write it to a .mjs file and give that file to startWithPeakRss. */
export const PEAK_RSS_PRELOAD = `import { writeFileSync } from 'node:fs';
process.on('exit', () => {
  const file = process.env.LENGTHWISE_PEAK_RSS_FILE;
  if (file) writeFileSync(file, String(process.resourceUsage().maxRSS));
});
`;

export interface Started {
  readonly exited: Promise<number | null>;
  /** The end of what it wrote on standard output and standard error (the last 20 000 characters of each). */
  stdout: string;
  stderr: string;
  readonly kill: (signal: NodeJS.Signals) => void;
}

/** Starts `bin` with `args`, the preload at `preload` writing its peak RSS into `rssFile`. */
export function startWithPeakRss(bin: string, preload: string, rssFile: string, args: readonly string[]): Started {
  const child = spawn(process.execPath, ['--import', pathToFileURL(preload).href, bin, ...args], {
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, NO_COLOR: '1', LENGTHWISE_PEAK_RSS_FILE: rssFile },
  });
  const s: Started = {
    exited: new Promise((resolve) => child.on('close', (code) => resolve(code))),
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
export async function peakMb(rssFile: string): Promise<number> {
  try {
    return Number(await readFile(rssFile, 'utf8')) / 1024;
  } catch {
    return Number.NaN;
  }
}
