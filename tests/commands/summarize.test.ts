import { execFileSync, spawnSync } from 'node:child_process';
import { readFile, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { summarizeTrial } from '../../src/study/summarize-trial.ts';
import { parseJobs } from '../../src/commands/summarize.ts';
import { csvRecords, expectTrialFiguresIn, trialFolder, type TrialFolder } from '../study/generated-trials.ts';
import { BIN, runLengthwise, type Ran } from '../helpers/command-child.ts';
import { deviceCopy, DEVICE_MAPPING } from '../helpers/device-copy.ts';
import type { SummaryJson } from '../../src/output/summary-json.ts';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
/** Runs the real command line as a child process, the way a user does, from the repository's folder and in its environment. */
function lengthwise(args: readonly string[]): Promise<Ran> {
  return runLengthwise(args, { cwd: ROOT, env: process.env });
}

let folder: TrialFolder;
const trials: string[] = [];
let corrupt = '';
let missing = '';
beforeAll(async () => {
  folder = await trialFolder('lengthwise-summarize-');
  trials.push((await folder.trial('s01-walk.ndjson', { seed: 41, subject: 'SYN-101' })).path);
  trials.push((await folder.trial('s01-run.ndjson', { seed: 42, scenario: 'run', subject: 'SYN-101' })).path);
  trials.push((await folder.trial('s02-walk.csv', { seed: 43, format: 'csv', subject: 'SYN-102' })).path);
  trials.push((await folder.trial('s02-run.ndjson', { seed: 44, scenario: 'run', subject: 'SYN-102' })).path);
  corrupt = await folder.file('s03-corrupt.ndjson', Buffer.from('\u0000\u0001binary junk\n{"t": 1, "muscle"\nnot a record\n'));
  missing = join(folder.dir, 's04-missing.ndjson');
});
afterAll(() => folder.remove());

describe('lengthwise summarize', () => {
  it('reads NDJSON trials in a device\'s own names and units through --mapping, to the same table as ours', async () => {
    const files = await deviceCopy(join(ROOT, 'replays', 'demo-walk.ndjson'), folder.dir);
    const [ours, device] = await Promise.all([
      lengthwise(['summarize', files.ours, '--jobs', '1', '--plain']),
      lengthwise(['summarize', files.device, '--mapping', DEVICE_MAPPING, '--jobs', '1', '--plain']),
    ]);
    expect([ours.code, device.code]).toEqual([0, 0]);
    const [a, b] = [csvRecords(ours.stdout), csvRecords(device.stdout)];
    expect(b).toHaveLength(2);
    expect(b.map((r) => r['muscle'])).toEqual(a.map((r) => r['muscle']));
    for (let row = 0; row < a.length; row++) {
      const [x, y] = [a[row]!, b[row]!];
      expect(Object.keys(y)).toEqual(Object.keys(x));
      for (const [column, value] of Object.entries(x)) {
        if (column === 'source_file') continue;
        const u = Number(value);
        // Millisecond times and centimetres round-trip to the last bits only.
        if (value !== '' && Number.isFinite(u)) expect(Number(y[column]), column).toBeCloseTo(u, 5);
        else expect(y[column], column).toBe(value);
      }
    }
    const refused = await lengthwise(['summarize', files.device, '--mapping', join(folder.dir, 'no-such-mapping.json')]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('the device mapping was not accepted');
  });

  it('prints its options for --help and exits 0', async () => {
    const ran = await lengthwise(['summarize', '--help']);
    expect(ran.code).toBe(0);
    for (const option of ['--out', '--report', '--calibration', '--jobs']) expect(ran.stdout).toContain(option);
  });

  it('asks for files when given none (exit 2)', async () => {
    const ran = await lengthwise(['summarize']);
    expect(ran.code).toBe(2);
    expect(ran.stderr).toContain('give one or more trial files');
  });

  it('refuses a job count that is not a whole number from 1, saying what is accepted (exit 2)', async () => {
    const ran = await lengthwise(['summarize', trials[0]!, '--jobs', '0']);
    expect(ran.code).toBe(2);
    expect(ran.stderr).toMatch(/--jobs "0" is not a number of workers: give a whole number from 1 up/);
    expect(parseJobs('3')).toEqual({ ok: true, jobs: 3 });
    expect(parseJobs('2.5').ok).toBe(false);
    expect(parseJobs('many').ok).toBe(false);
  });

  it('refuses a calibration that is not accepted, naming the problem (exit 2)', async () => {
    const cal = await folder.file('bad-cal.json', '{"muscles": {"calf": {"method": "guess"}}}');
    const ran = await lengthwise(['summarize', trials[0]!, '--calibration', cal]);
    expect(ran.code).toBe(2);
    expect(ran.stderr).toContain('the calibration was not accepted');
  });

  it('writes the study table of one trial to standard output when no --out is given', async () => {
    const ran = await lengthwise(['summarize', trials[0]!, '--jobs', '1']);
    expect(ran.code).toBe(0);
    const rows = csvRecords(ran.stdout);
    expect(rows.map((r) => r.muscle)).toEqual(['calf', 'thigh']);
    expect(ran.stderr).toMatch(/summarized 1 of 1 trials in [\d.]+ s \(.*, 1 worker\)/);
  });

  it('says each trial\'s warnings in its plain line: uncalibrated, side assumed, strides estimated', async () => {
    // No gait events in 14 s: strides estimated from the fascicle signal.
    const long = await folder.trial('s05-walk-long.ndjson', { seed: 45, durationS: 14 });
    const noEvents = (await readFile(long.path, 'utf8')).split('\n').filter((l) => !l.includes('"event"')).join('\n');
    const estimated = await folder.file('s05-no-events.ndjson', noEvents);
    const ran = await lengthwise(['summarize', trials[0]!, trials[2]!, estimated, '--jobs', '1', '--plain']);
    expect(ran.code).toBe(0);
    const lines = ran.stderr.split('\n');
    const lineOf = (path: string): string => lines.find((l) => l.includes(`${path}:`)) ?? '';
    expect(lineOf(trials[0]!)).not.toMatch(/UNCALIBRATED|assumed|estimated/);
    // The CSV trial has no header: no calibration, no sides.
    expect(lineOf(trials[2]!)).toMatch(/samples · UNCALIBRATED: calf, thigh · side assumed: calf, thigh · /);
    expect(lineOf(estimated)).toMatch(/samples · strides estimated: calf, thigh · /);
    expect(lineOf(estimated)).toContain('2 with warnings');
    // The same flags as the table's columns.
    const rows = csvRecords(ran.stdout);
    expect(rows.filter((r) => r.uncalibrated === 'true').map((r) => r.muscle)).toEqual(['calf', 'thigh']);
    expect(rows.filter((r) => r.segmentation_estimated === 'true').map((r) => r.muscle)).toEqual(['calf', 'thigh']);
  });

  it('summarizes many trials on worker threads, names a missing and a corrupt file with reasons, and exits 1', async () => {
    const out = join(folder.dir, 'out', 'study.csv');
    const report = join(folder.dir, 'out', 'study.html');
    const ran = await lengthwise(['summarize', trials[0]!, missing, trials[1]!, corrupt, trials[2]!, trials[3]!, '--out', out, '--report', report, '--jobs', '2']);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toMatch(/s04-missing\.ndjson \(no such file\); check the path/);
    expect(ran.stderr).toMatch(/s03-corrupt\.ndjson has no valid sample in 3 lines/);
    expect(ran.stderr).toMatch(/summarized 4 of 6 trials .*; 2 failed/);
    // Not a terminal: one plain line per finished trial, no bar drawing.
    expect(ran.stderr).not.toContain('\r');
    expect(ran.stderr.match(/^\[\d\/6\]/gm)).toHaveLength(6);

    const rows = csvRecords(await readFile(out, 'utf8'));
    expect(rows).toHaveLength(8);
    // One report over the trials summarized: three plots per trial × muscle and two overviews.
    const html = await readFile(report, 'utf8');
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html.match(/<section class="entry"/g)).toHaveLength(8);
    expect(html.match(/<svg/g)).toHaveLength(8 * 3 + 2);
    expect(ran.stderr).toContain(`report written to ${report}`);
    let i = 0;
    for (const path of trials) {
      const outcome = await summarizeTrial(path);
      if (!outcome.ok) throw new Error(outcome.message);
      for (const [muscle, m] of Object.entries(outcome.summary.muscles)) {
        const row = rows[i++]!;
        expect(row).toMatchObject({ source_file: path, subject: outcome.summary.subject ?? '', muscle });
        expectTrialFiguresIn(row, m.trial);
      }
    }
  });

  it('gives the same figures as replay --summary for the same file', async () => {
    const summaryPath = join(folder.dir, 'replayed-summary.json');
    const replayed = await lengthwise(['replay', trials[2]!, '--speed', 'max', '--plain', '--summary', summaryPath]);
    expect(replayed.code).toBe(0);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8')) as SummaryJson;
    const ran = await lengthwise(['summarize', trials[2]!, '--jobs', '1']);
    const rows = csvRecords(ran.stdout);
    expect(rows.map((r) => r.muscle)).toEqual(Object.keys(summary.muscles));
    for (const row of rows) {
      expectTrialFiguresIn(row, summary.muscles[row.muscle!]!.trial);
    }
  });

  it('applies one calibration file to every trial', async () => {
    const cal = join(ROOT, 'replays', 'demo-calibration.json');
    const ran = await lengthwise(['summarize', trials[2]!, trials[0]!, '--calibration', cal, '--jobs', '2']);
    expect(ran.code).toBe(0);
    const rows = csvRecords(ran.stdout);
    expect(rows).toHaveLength(4);
    for (const row of rows) expect(row).toMatchObject({ calibration_source: 'file', uncalibrated: 'false' });
  });

  it('says when the table cannot be written (exit 1)', async () => {
    const blocker = await folder.file('not-a-folder', 'x');
    const ran = await lengthwise(['summarize', trials[0]!, '--out', join(blocker, 'study.csv')]);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toMatch(/could not write .*study\.csv/);
  });
});

function hasTmux(): boolean {
  try {
    execFileSync('tmux', ['-V'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

describe.skipIf(!hasTmux())('lengthwise summarize on a terminal (tmux)', () => {
  it('draws a progress bar on the terminal, clears it, and ends with the tally', { timeout: 90_000 }, async () => {
    const socket = `lw-summarize-${process.pid}`;
    const tmux = (...args: string[]): string => execFileSync('tmux', ['-L', socket, ...args], { encoding: 'utf8' });
    const screen = (): string => tmux('capture-pane', '-p', '-t', 'summarize');
    const go = join(folder.dir, 'tty-go');
    const out = join(folder.dir, 'tty-study.csv');
    const done = join(folder.dir, 'tty-done');
    const raw = join(folder.dir, 'tty-raw');
    const command = [process.execPath, BIN, 'summarize', ...trials, '--out', out, '--jobs', '2'].map((a) => `'${a}'`).join(' ');
    // The command waits for the go file, made once the pane's output is piped to a file: nothing it draws is missed.
    tmux('new-session', '-d', '-s', 'summarize', '-x', '100', '-y', '20', `while [ ! -e '${go}' ]; do sleep 0.05; done; ${command}; echo "exit=$?" > '${done}'; sleep 30`);
    try {
      tmux('pipe-pane', '-t', 'summarize', `cat > '${raw}'`);
      await writeFile(go, '');
      /** Waits (bounded) until `read()` gives text `ok` accepts; fails saying what it last read. */
      const readWhere = async (read: () => Promise<string>, ok: (text: string) => boolean, what: string): Promise<string> => {
        const until = Date.now() + 30_000;
        for (;;) {
          const text = await read();
          if (ok(text)) return text;
          if (Date.now() > until) throw new Error(`${what} did not happen within 30 s; the screen showed:\n${screen()}`);
          await new Promise((resolve) => setTimeout(resolve, 100));
        }
      };
      const fileText = (path: string) => () => readFile(path, 'utf8').catch(() => '');
      expect(await readWhere(fileText(done), (t) => t !== '', 'the end of summarize')).toContain('exit=0');
      const shown = await readWhere(async () => screen(), (t) => /summarized 4 of 4 trials/.test(t), 'the tally on screen');
      // The bar is drawn over itself and cleared: no per-trial lines are left on screen, but a trial's warnings are.
      expect(shown).not.toMatch(/^\[\d\/4\]/m);
      // (joined, should the terminal have wrapped the line)
      expect(shown.replaceAll('\n', '')).toContain(`${trials[2]}: UNCALIBRATED: calf, thigh · side assumed: calf, thigh`);
      expect(shown).toMatch(/, 2 workers\)/);
      const bar = /█*░+ \d\/4 trials · .* samples\/s · .* left/;
      const written = await readWhere(fileText(raw), (t) => t.includes('\r\x1b[2K') && bar.test(t), 'the bar drawn on the terminal');
      expect(written).toContain('\r\x1b[2K');
      expect(written).toMatch(bar);
    } finally {
      spawnSync('tmux', ['-L', socket, 'kill-server']);
    }
  });
});
