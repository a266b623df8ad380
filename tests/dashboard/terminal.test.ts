/**
 * The dashboard in a real terminal: tmux runs it (the bundled demo replay with `npm start`, or a live
 * session fed by the test itself), the test reads the screen with capture-pane and presses keys as a
 * person would. Nothing here depends on seeing a moment: each wait is for what the data already sent
 * must show, a message shown only for a while is read from everything drawn on the terminal, and the
 * live session's data goes on only when the test has seen what it waits for. Skipped, saying so, where
 * tmux is absent.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { BASELINE_SHIFT_HOLD_STRIDES } from '../../src/dashboard/view/alerts.ts';
import { killServer, nextConnection, sendAll, wsServer } from '../adapters/ws-peers.ts';
import { ALERT_TRIAL, alertTrialHeader, alertTrialRecords, leftFootStrikeFrom, OPEN_PLAN, STRIDE_S, type AlertTrialPlan } from './alert-trial.ts';
import { COLOUR_SGR, plain } from './terminal-double.ts';

const HAS_TMUX = spawnSync('tmux', ['-V'], { encoding: 'utf8' }).status === 0;
const REPO = join(import.meta.dirname, '..', '..');
const SOCKET = `lengthwise-dashboard-test-${process.pid}`;
const work = mkdtempSync(join(tmpdir(), 'lengthwise-terminal-'));
/** How long any wait may last: it ends as soon as its condition holds, so this only bounds a hang. */
const WAIT_MS = 30_000;

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

async function screenWhere(name: string, ok: (text: string) => boolean, what: string, timeoutMs = WAIT_MS): Promise<string> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const text = screen(name);
    if (ok(text)) return text;
    if (Date.now() > until) throw new Error(`the screen never showed ${what} within ${timeoutMs} ms; it showed:\n${text}`);
    await sleep(150);
  }
}

/** From now on, everything the session's program writes to its terminal is kept in a file (the path returned). */
function recordDrawing(name: string): string {
  const path = join(work, `${name}.drawn`);
  tmux('pipe-pane', '-t', name, `cat >> '${path}'`);
  return path;
}

/** Waits until the text drawn since `recordDrawing` holds `text`, however briefly it stayed on screen. */
async function drawn(path: string, text: string, name: string, timeoutMs = WAIT_MS): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (!(existsSync(path) && plain(readFileSync(path, 'utf8')).includes(text))) {
    if (Date.now() > until) throw new Error(`the terminal was never drawn with "${text}" within ${timeoutMs} ms; it shows:\n${screen(name)}`);
    await sleep(100);
  }
}

async function fileWhere(path: string, what: string, timeoutMs = WAIT_MS): Promise<string> {
  const until = Date.now() + timeoutMs;
  while (!existsSync(path) || readFileSync(path, 'utf8').trim() === '') {
    if (Date.now() > until) throw new Error(`${what} (${path}) did not appear within ${timeoutMs} ms`);
    await sleep(100);
  }
  return readFileSync(path, 'utf8');
}

/** What `promise` gives, or a failure saying what did not happen and what the screen showed. */
async function within<T>(promise: Promise<T>, what: string, shown: () => string, timeoutMs = WAIT_MS): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not happen within ${timeoutMs} ms; the screen showed:\n${shown()}`)), timeoutMs);
  });
  try {
    return await Promise.race([promise, late]);
  } finally {
    clearTimeout(timer);
  }
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
    // Read once the frame that says FROZEN has been drawn whole (a busy machine may be caught mid-frame).
    let last = '';
    const frozen = await screenWhere(
      'demo',
      (t) => {
        const same = t.includes('FROZEN') && trialPart(t) === last;
        last = trialPart(t);
        return same;
      },
      'FROZEN, drawn whole',
    );
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

    // The confirmation stays a few seconds of wall time: it is looked for in everything drawn since the key.
    const drawing = recordDrawing('demo');
    keys('demo', 'm');
    await drawn(drawing, 'marker 1 placed', 'demo');

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

  it('raises the alerts of a troubled trial as they happen and clears each when its cause is gone', { timeout: 240_000 }, async () => {
    // The test is the device: the session connects to it, and it sends the invented trial in step with
    // what it checks, holding the stream while it waits for the screen, so no alert can come and go unseen.
    const device = await wsServer();
    const connection = nextConnection(device.server);
    const log = join(work, 'alerts.ndjson');
    const status = start('alerts', `node bin/lengthwise.js live --connect ${device.url} --log '${log}'`);
    try {
      const ws = await within(connection, 'the session to connect to the device', () => screen('alerts'));
      let plan: AlertTrialPlan = OPEN_PLAN;
      let sentS = 0;
      /** Sends the trial from where it is up to `toS`, a tenth of a second of it a message, and waits until it has left. */
      const sendTo = async (toS: number): Promise<void> => {
        const messages: string[] = [];
        for (let fromS = sentS; fromS < toS - 1e-9; fromS = Math.min(toS, fromS + 0.1)) {
          messages.push(`[${alertTrialRecords(plan, fromS, Math.min(toS, fromS + 0.1)).join(',')}]`);
        }
        await sendAll(ws, messages);
        // Whole samples, so the next span starts exactly where this one ended.
        sentS = Math.round(toS * ALERT_TRIAL.rateHz) / ALERT_TRIAL.rateHz;
      };
      /** Sends the trial on at its own pace (a tenth of a second every 100 ms) until the screen shows what is asked. */
      const streamUntil = async (ok: (text: string) => boolean, what: string): Promise<string> => {
        const until = Date.now() + WAIT_MS;
        for (;;) {
          const stepEnds = Date.now() + 100;
          await sendTo(sentS + 0.1);
          const text = screen('alerts');
          if (ok(text)) return text;
          if (Date.now() > until) throw new Error(`the screen never showed ${what} within ${WAIT_MS} ms of the trial going on; it showed:\n${text}`);
          await sleep(Math.max(0, stepEnds - Date.now()));
        }
      };
      await sendAll(ws, [alertTrialHeader()]);
      const lowQuality = 'calf: tracking quality low for';
      const silent = 'thigh: no samples for';
      const moved = 'calf: mean length up 15%';
      const [lowFromS, lowToS] = ALERT_TRIAL.lowQualityS;

      // Tracking quality low from 5 s of trial time: the screen takes in its start (calf's quality 0.35)
      // before the trial goes on past a second of it, so the alert is due; it goes when quality recovers at 8 s.
      await sendTo(lowFromS + 0.5);
      await screenWhere('alerts', (t) => t.includes('quality 0.35'), "calf's low quality");
      await sendTo(lowToS - 0.5);
      await screenWhere('alerts', (t) => t.includes(lowQuality), 'the low-quality alert');
      await sendTo(lowToS + 0.5);
      await screenWhere('alerts', (t) => !t.includes(lowQuality) && t.includes('SL '), 'the low-quality alert cleared');

      // thigh silent from 10 s while calf goes on in real time: raised after a second of wall time, for as
      // long as it takes the screen to show it; gone once thigh is back.
      await sendTo(ALERT_TRIAL.silentFromS);
      await streamUntil((t) => t.includes(silent), 'the no-samples alert');
      plan = { ...plan, thighBackS: sentS };
      await streamUntil((t) => !t.includes(silent) && t.includes('SL '), 'the no-samples alert cleared');

      // calf's fascicle baseline jumps 15% at a foot strike a few strides on: raised when that stride
      // closes, and held for three more strides.
      plan = { ...plan, shiftAtS: leftFootStrikeFrom(sentS + 3 * STRIDE_S) };
      await sendTo(plan.shiftAtS + STRIDE_S + 0.3);
      const shifted = await screenWhere('alerts', (t) => t.includes(moved), 'the probe-moved alert');
      expect(shifted).toContain('probe moved? check, recalibrate');
      await sendTo(plan.shiftAtS + (1 + BASELINE_SHIFT_HOLD_STRIDES) * STRIDE_S + 0.3);
      await screenWhere('alerts', (t) => !t.includes(moved) && t.includes('SL '), 'the probe-moved alert cleared');
      expect(ALERT_TRIAL.shiftFactor).toBeGreaterThan(1.1);

      keys('alerts', 'q');
      expect((await fileWhere(status, 'the exit status')).trim()).toBe('0');
    } finally {
      await killServer(device.server);
    }
  });
});
