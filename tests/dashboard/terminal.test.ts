/**
 * The dashboard in a real terminal: tmux runs `npm start` (the bundled demo replay), the test reads the
 * screen with capture-pane and presses keys as a person would. Skipped, saying so, where tmux is absent.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ALERT_TRIAL, writeAlertTrial } from './alert-trial.ts';
import { COLOUR_SGR } from './terminal-double.ts';

const HAS_TMUX = spawnSync('tmux', ['-V'], { encoding: 'utf8' }).status === 0;
const REPO = join(import.meta.dirname, '..', '..');
const SOCKET = `lengthwise-dashboard-test-${process.pid}`;
const work = mkdtempSync(join(tmpdir(), 'lengthwise-terminal-'));

function tmux(...args: string[]): string {
  return execFileSync('tmux', ['-L', SOCKET, ...args], { encoding: 'utf8' });
}

function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/** Starts `command` in a new session of `columns`×`rows`; its exit status lands in `<name>.status`. */
function start(name: string, command: string, columns = 80, rows = 24, env: Record<string, string> = {}, cwd = REPO): string {
  const status = join(work, `${name}.status`);
  const exports = Object.entries(env)
    .map(([k, v]) => `export ${k}='${v}'; `)
    .join('');
  const script = `cd '${cwd}' && ${exports}${command}; echo $? > '${status}'; sleep 60`;
  tmux('new-session', '-d', '-s', name, '-x', String(columns), '-y', String(rows), script);
  return status;
}

function screen(name: string, escapes = false): string {
  return tmux('capture-pane', '-p', ...(escapes ? ['-e'] : []), '-t', name);
}

async function screenWhere(name: string, ok: (text: string) => boolean, what: string, timeoutMs = 20_000): Promise<string> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const text = screen(name);
    if (ok(text)) return text;
    if (Date.now() > until) throw new Error(`the screen never showed ${what} within ${timeoutMs} ms; it showed:\n${text}`);
    await sleep(150);
  }
}

async function fileWhere(path: string, what: string, timeoutMs = 15_000): Promise<string> {
  const until = Date.now() + timeoutMs;
  while (!existsSync(path) || readFileSync(path, 'utf8').trim() === '') {
    if (Date.now() > until) throw new Error(`${what} (${path}) did not appear within ${timeoutMs} ms`);
    await sleep(100);
  }
  return readFileSync(path, 'utf8');
}

function keys(name: string, ...pressed: string[]): void {
  tmux('send-keys', '-t', name, ...pressed);
}

afterAll(() => {
  if (HAS_TMUX) spawnSync('tmux', ['-L', SOCKET, 'kill-server']);
  rmSync(work, { recursive: true, force: true });
});

const title = HAS_TMUX ? 'the dashboard in a real terminal' : 'the dashboard in a real terminal (skipped: tmux is not installed)';

describe.skipIf(!HAS_TMUX)(title, () => {
  it('plays the demo with npm start, answers the keys, and writes the summary when q quits', { timeout: 90_000 }, async () => {
    const summary = join(work, 'summary.json');
    const status = start('demo', `npm start --silent -- --summary '${summary}'`);
    const first = await screenWhere('demo', (t) => t.includes('SL ') && t.includes('thigh') && /\d+ samples\/s/.test(t), 'both muscle panels with a rate');
    expect(first).toContain('calf');
    expect(first).toContain('calibrated');
    expect(first).toMatch(/SL \d\.\d\d µm/);
    expect(first.split('\n').filter((l) => l.trim() !== '').length).toBeLessThan(24);

    keys('demo', 'Space');
    // The replay bar keeps moving (ingestion goes on); everything read from the trial stays.
    const trialPart = (t: string): string => t.split('\n').filter((l) => !l.startsWith('replay ')).join('\n');
    const frozen = await screenWhere('demo', (t) => t.includes('FROZEN'), 'FROZEN');
    await sleep(600);
    expect(trialPart(screen('demo'))).toBe(trialPart(frozen));
    keys('demo', 'Space');
    await screenWhere('demo', (t) => !t.includes('FROZEN'), 'the display resumed');

    keys('demo', 'Tab');
    await screenWhere('demo', (t) => t.includes('▸ thigh'), 'the focus on thigh');

    keys('demo', '?');
    await screenWhere('demo', (t) => t.includes('reading a panel'), 'the help');
    keys('demo', 'Escape');
    await screenWhere('demo', (t) => !t.includes('reading a panel') && t.includes('SL '), 'the panels back');

    keys('demo', 'm');
    await screenWhere('demo', (t) => t.includes('marker 1 dropped'), 'the marker confirmation');

    keys('demo', 'q');
    expect((await fileWhere(status, 'the exit status')).trim()).toBe('0');
    const written = JSON.parse(await fileWhere(summary, 'the summary')) as Record<string, unknown>;
    expect(typeof written).toBe('object');
  });

  it('stacks the panels when the terminal narrows and puts them side by side again when it widens, even in a shell with CI set', { timeout: 60_000 }, async () => {
    // Ink holds frames back when it sees CI; the screen's thread must not, on a person's terminal.
    const status = start('resize', 'npm start --silent', 80, 40, { CI: 'true' });
    const sideBySide = (t: string): boolean => t.split('\n').some((l) => l.includes('calf') && l.includes('thigh'));
    await screenWhere('resize', (t) => t.includes('SL ') && sideBySide(t), 'the panels side by side');
    tmux('resize-window', '-t', 'resize', '-x', '60', '-y', '40');
    await screenWhere('resize', (t) => t.includes('calf') && t.includes('thigh') && !sideBySide(t), 'the panels stacked');
    tmux('resize-window', '-t', 'resize', '-x', '100', '-y', '40');
    await screenWhere('resize', (t) => sideBySide(t), 'the panels side by side again');
    keys('resize', 'q');
    expect((await fileWhere(status, 'the exit status')).trim()).toBe('0');
  });

  it('draws the dashboard when run from another folder, away from the project\'s own settings', { timeout: 60_000 }, async () => {
    const status = start('elsewhere', `node '${join(REPO, 'bin', 'lengthwise.js')}' replay '${join(REPO, 'replays', 'demo-walk.ndjson')}'`, 80, 24, {}, work);
    await screenWhere('elsewhere', (t) => t.includes('SL ') && t.includes('thigh'), 'the panels');
    expect(screen('elsewhere')).not.toContain('the dashboard stopped');
    keys('elsewhere', 'q');
    expect((await fileWhere(status, 'the exit status')).trim()).toBe('0');
  });

  it('writes no colour codes at all when NO_COLOR is set', { timeout: 60_000 }, async () => {
    const status = start('plain', 'npm start --silent', 80, 24, { NO_COLOR: '1' });
    await screenWhere('plain', (t) => t.includes('SL ') && t.includes('thigh'), 'the panels');
    const painted = screen('plain', true);
    expect(painted).not.toMatch(COLOUR_SGR);
    keys('plain', 'q');
    expect((await fileWhere(status, 'the exit status')).trim()).toBe('0');
  });

  it('paints the regions in colour without NO_COLOR', { timeout: 60_000 }, async () => {
    const status = start('colour', 'npm start --silent', 80, 24, { TERM: 'xterm-256color' });
    await screenWhere('colour', (t) => t.includes('SL ') && t.includes('thigh'), 'the panels');
    expect(screen('colour', true)).toMatch(COLOUR_SGR);
    keys('colour', 'q');
    expect((await fileWhere(status, 'the exit status')).trim()).toBe('0');
  });

  it('raises the alerts of a troubled trial as they happen and clears each when its cause is gone', { timeout: 90_000 }, async () => {
    const trial = join(work, 'alerts.ndjson');
    writeAlertTrial(trial);
    const status = start('alerts', `node bin/lengthwise.js replay '${trial}' --speed 2`);
    const lowQuality = 'calf: tracking quality low for';
    const silent = 'thigh: no samples for';
    const moved = 'calf: mean length up 15%';
    // Tracking quality low from 5 s of trial time; raised after more than a second of it, gone when it recovers at 8 s.
    await screenWhere('alerts', (t) => t.includes(lowQuality), 'the low-quality alert');
    await screenWhere('alerts', (t) => !t.includes(lowQuality) && t.includes('SL '), 'the low-quality alert cleared');
    // thigh silent from 10 s while calf goes on: raised after a second of wall time, gone when thigh is back.
    await screenWhere('alerts', (t) => t.includes(silent), 'the no-samples alert');
    await screenWhere('alerts', (t) => !t.includes(silent), 'the no-samples alert cleared');
    // calf's fascicle baseline jumps 15% at a foot strike: raised when that stride closes.
    const shifted = await screenWhere('alerts', (t) => t.includes(moved), 'the probe-moved alert');
    expect(shifted).toContain('probe moved? check, recalibrate');
    await screenWhere('alerts', (t) => !t.includes(moved) && t.includes('SL '), 'the probe-moved alert cleared', 20_000);
    expect(ALERT_TRIAL.shiftFactor).toBeGreaterThan(1.1);
    keys('alerts', 'q');
    expect((await fileWhere(status, 'the exit status')).trim()).toBe('0');
  });
});
