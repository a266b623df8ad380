/**
 * In-memory stdout and stdin for rendering the dashboard with Ink in tests, like ink-testing-library's
 * but with a chosen size that can be resized, so layouts at 80×24 and beyond are tested.
 */
import { EventEmitter } from 'node:events';
import { render, type Instance } from 'ink';
import { BehaviorSubject } from 'rxjs';
import { startDashboard, type DashboardOptions } from '../../src/dashboard/thread/start-dashboard.tsx';
import { walkingState } from './fixtures.ts';
import type { ReactElement } from 'react';

export class ScreenOut extends EventEmitter {
  readonly frames: string[] = [];
  isTTY = false;
  constructor(
    public columns = 80,
    public rows = 24,
  ) {
    super();
  }
  write = (frame: string): boolean => {
    this.frames.push(frame);
    return true;
  };
  lastFrame(): string {
    return this.frames[this.frames.length - 1] ?? '';
  }
  resize(columns: number, rows: number): void {
    this.columns = columns;
    this.rows = rows;
    this.emit('resize');
  }
}

export class KeysIn extends EventEmitter {
  constructor(public isTTY: boolean | undefined = true) {
    super();
  }
  /** Written but not yet read, as a terminal would buffer it. */
  private data: string | null = null;
  write(data: string): void {
    this.data = (this.data ?? '') + data;
    this.emit('readable');
    this.emit('data', data);
  }
  read = (): string | null => {
    const { data } = this;
    this.data = null;
    return data;
  };
  setEncoding(): void {}
  setRawMode(): void {}
  resume(): void {}
  pause(): void {}
  ref(): void {}
  unref(): void {}
}

export interface Screen {
  readonly out: ScreenOut;
  readonly keys: KeysIn;
  readonly instance: Instance;
  lastFrame(): string;
  /** Types keys, one write each, letting Ink handle each before the next. */
  press(...keys: string[]): Promise<void>;
}

export const KEY = { tab: '\t', shiftTab: '\u001B[Z', enter: '\r', escape: '\u001B', backspace: '\u007F', right: '\u001B[C', left: '\u001B[D' } as const;

export function tick(ms = 0): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

export function renderScreen(tree: ReactElement, columns = 80, rows = 24, keysAreTerminal = true): Screen {
  const out = new ScreenOut(columns, rows);
  const keys = new KeysIn(keysAreTerminal);
  const instance = render(tree, {
    stdout: out as unknown as NodeJS.WriteStream,
    stdin: keys as unknown as NodeJS.ReadStream,
    debug: true,
    exitOnCtrlC: false,
    patchConsole: false,
  });
  return {
    out,
    keys,
    instance,
    lastFrame: () => out.lastFrame(),
    press: async (...pressed: string[]) => {
      // Ink starts reading once its input hook's effect has run.
      await waitFor(() => keys.listenerCount('readable') > 0, 'the dashboard listening to keys');
      for (const k of pressed) {
        keys.write(k);
        await tick(15);
      }
    },
  };
}

/**
 * How long a wait may last before the test fails. Waits end as soon as their condition holds, so this
 * only bounds a hang; it is generous because CI runs the test files in parallel on two cores.
 */
export const WAIT_LIMIT_MS = 15_000;

/** Waits (real time, bounded) until the last frame satisfies `ok`; returns that frame or throws with it. */
export async function frameWhere(screen: Screen, ok: (frame: string) => boolean, what: string, timeoutMs = WAIT_LIMIT_MS): Promise<string> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const frame = screen.lastFrame();
    if (ok(frame)) return frame;
    if (Date.now() > until) throw new Error(`no frame ${what} within ${timeoutMs} ms; last frame:\n${frame}`);
    await tick(10);
  }
}

/**
 * An SGR sequence that sets a colour: 30–38 / 40–48 (8 colours; 38 and 48 lead 256 and true colour),
 * 90–97 / 100–107 (bright). 39 and 49 only return to the terminal's own colours (tmux writes them after
 * every attribute reset), so they do not count.
 */
// eslint-disable-next-line no-control-regex -- the escape character is what is looked for
export const COLOUR_SGR = /\u001B\[(?:[0-9;]*;)?(?:3[0-8]|4[0-8]|9[0-7]|10[0-7])(?:;[0-9;]*)?m/;

/** Removes every escape sequence, for reading the text. */
export function plain(frame: string): string {
  // eslint-disable-next-line no-control-regex -- escape sequences are what is removed
  return frame.replace(/\u001B\[[0-9;?]*[A-Za-z]/g, '');
}

/** Waits until the last frame's text holds `text`; fails with the frame. */
export async function shows(screen: Screen, text: string): Promise<void> {
  await frameWhere(screen, (f) => plain(f).includes(text), `showing "${text}"`);
}

/** Waits until the last frame's text no longer holds `text`; fails with the frame. */
export async function hides(screen: Screen, text: string): Promise<void> {
  await frameWhere(screen, (f) => !plain(f).includes(text), `without "${text}"`);
}

/** Waits (real time, bounded) until `ok()` holds. */
export async function waitFor(ok: () => boolean, what: string, timeoutMs = WAIT_LIMIT_MS): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (!ok()) {
    if (Date.now() > until) throw new Error(`${what} did not happen within ${timeoutMs} ms`);
    await tick(10);
  }
}

/** startDashboard on the given stand-in terminal, showing the walking fixture unless told otherwise. */
export function startWalking(stdout: object, stdin: object, more: Partial<DashboardOptions> = {}): ReturnType<typeof startDashboard> {
  return startDashboard({
    state$: new BehaviorSubject(walkingState()),
    title: 'lengthwise',
    stdout: stdout as NodeJS.WriteStream,
    stdin: stdin as NodeJS.ReadStream,
    env: {},
    onQuit: () => undefined,
    ...more,
  });
}
