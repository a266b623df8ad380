/**
 * The dashboard on its own thread, for real: a worker thread running Ink writes to a file's descriptor
 * (standing in for the terminal's), keys typed on a stand-in standard input reach it, and what it asks
 * for comes back to this thread.
 */
import '../force-color.ts';
import { EventEmitter } from 'node:events';
import { closeSync, mkdtempSync, openSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { BehaviorSubject, NEVER } from 'rxjs';
import { startDashboard, type DashboardOptions } from '../../../src/dashboard/thread/start-dashboard.tsx';
import { screenEnv } from '../../../src/dashboard/thread/start-dashboard-thread.ts';
import { pushSample, walkingState } from '../fixtures.ts';
import { COLOUR_SGR, KeysIn, plain, startWalking, waitFor } from '../terminal-double.ts';

/** A terminal's standard output as the commands get it: a descriptor, a size, resize events. */
class FileTerminal extends EventEmitter {
  readonly isTTY = true;
  readonly fd: number;
  readonly writes: string[] = [];
  constructor(
    readonly path: string,
    public columns = 100,
    public rows = 30,
  ) {
    super();
    this.fd = openSync(path, 'w');
  }
  /** What this thread writes (only the screen restore after a failure). */
  write = (data: string): boolean => {
    this.writes.push(data);
    return true;
  };
  screen(): string {
    return readFileSync(this.path, 'utf8');
  }
  /** The text of the last whole frame (each begins with the synchronized-output bracket). */
  lastFrame(): string {
    const frames = this.screen().split('\u001B[?2026h');
    return plain(frames.at(-2) ?? '');
  }
}

/** Standard input that notes each switch of raw mode. */
function rawKeys(terminal = true): KeysIn & { readonly rawMode: boolean[] } {
  const keys = new KeysIn();
  keys.isTTY = terminal ? true : undefined;
  const rawMode: boolean[] = [];
  return Object.assign(keys, { rawMode, setRawMode: (on: boolean) => void rawMode.push(on) });
}

const cleanups: (() => void)[] = [];
afterEach(() => {
  for (const c of cleanups.splice(0)) c();
});

function terminal(): { out: FileTerminal; keys: ReturnType<typeof rawKeys> } {
  const dir = mkdtempSync(join(tmpdir(), 'lengthwise-thread-'));
  const out = new FileTerminal(join(dir, 'screen'));
  cleanups.push(() => {
    closeSync(out.fd);
    rmSync(dir, { recursive: true, force: true });
  });
  return { out, keys: rawKeys() };
}

/** The walking fixture on its own thread, with what the test gives. */
function startOnThread(stdout: object, stdin: object, more: Partial<DashboardOptions> = {}): ReturnType<typeof startDashboard> {
  return startWalking(stdout, stdin, { frameMs: 20, thread: 'own', ...more });
}

describe('startDashboard on its own thread', () => {
  it('draws the trial on the terminal, takes keys in raw mode, and q quits, unmounts and gives the terminal back', async () => {
    const { out, keys } = terminal();
    const state = walkingState();
    const state$ = new BehaviorSubject(state);
    const asked: string[] = [];
    const dashboard = startOnThread(out, keys, {
      state$,
      onQuit: () => asked.push('quit'),
      onMarker: (text) => asked.push(`marker ${text}`),
      onSpeed: (direction) => asked.push(`speed ${direction}`),
    });
    await waitFor(() => plain(out.screen()).includes('SL 2.71 µm'), 'the panels on the terminal');
    expect(out.screen()).toMatch(COLOUR_SGR);
    expect(keys.rawMode).toEqual([true]);
    // New figures reach the screen.
    pushSample(state, 'calf', { tS: 6, sarcomereUm: 3.04 });
    state$.next(state);
    await waitFor(() => plain(out.screen()).includes('SL 3.04 µm'), 'the new sample');
    keys.write('m');
    keys.write('+');
    await waitFor(() => asked.length === 2, 'the marker and the speed');
    expect(asked[0]).toMatch(/^marker /);
    expect(asked[1]).toBe('speed 1');
    keys.write('q');
    await dashboard.waitUntilExit();
    expect(asked[2]).toBe('quit');
    expect(keys.rawMode).toEqual([true, false]);
    expect(keys.listenerCount('data')).toBe(0);
    expect(state$.observed).toBe(false);
    expect(out.listenerCount('resize')).toBe(0);
    // Ink showed the cursor again as it left.
    expect(out.screen().endsWith('\u001B[?25h')).toBe(true);
  });

  it('says it is shown only once its thread has drawn the first screen', async () => {
    const { out, keys } = terminal();
    let shown = false;
    const dashboard = startOnThread(out, keys, { state$: NEVER });
    void dashboard.shown.then(() => (shown = true));
    // Loading Ink and React on the new thread takes a while; the screen is there the moment it says so.
    await dashboard.shown;
    expect(shown).toBe(true);
    expect(plain(out.screen())).toContain('waiting for the first samples');
    dashboard.unmount();
    await dashboard.waitUntilExit();
  });

  it('follows a resize of the terminal', async () => {
    const { out, keys } = terminal();
    const dashboard = startOnThread(out, keys, { env: { NO_COLOR: '1' } });
    await waitFor(() => plain(out.screen()).includes('SL 2.71 µm'), 'the panels');
    expect(out.screen()).not.toMatch(COLOUR_SGR);
    const wide = Math.max(...plain(out.screen()).split('\n').map((l) => l.length));
    expect(wide).toBeLessThanOrEqual(100);
    const before = out.screen().length;
    out.columns = 60;
    out.rows = 20;
    out.emit('resize');
    await waitFor(() => {
      const last = out.lastFrame();
      return out.screen().length > before && last.includes('SL 2.71 µm') && Math.max(...last.split('\n').map((l) => l.length)) <= 60;
    }, 'a frame 60 columns wide');
    dashboard.unmount();
    await dashboard.waitUntilExit();
  });

  it('shows the trial without keys when standard input is not a terminal, and unmount ends it', async () => {
    const { out } = terminal();
    const keys = rawKeys(false);
    const dashboard = startOnThread(out, keys);
    await waitFor(() => plain(out.screen()).includes('no keys: standard input is not a terminal'), 'the footer saying so');
    expect(keys.rawMode).toEqual([]);
    dashboard.unmount();
    await dashboard.waitUntilExit();
  });

  it('draws every frame as it comes even when a CI variable is set in the shell', async () => {
    const { out, keys } = terminal();
    const state = walkingState();
    const state$ = new BehaviorSubject(state);
    process.env['CI'] = 'true';
    cleanups.push(() => delete process.env['CI']);
    const dashboard = startOnThread(out, keys, { state$ });
    await waitFor(() => plain(out.screen()).includes('SL 2.71 µm'), 'the first frame');
    pushSample(state, 'calf', { tS: 6, sarcomereUm: 3.04 });
    state$.next(state);
    await waitFor(() => plain(out.screen()).includes('SL 3.04 µm'), 'the next frame, before the end');
    dashboard.unmount();
    await dashboard.waitUntilExit();
  });

  it('gives its thread the colours of the terminal and no CI variable', () => {
    const saved = { ...process.env };
    cleanups.push(() => {
      for (const key of Object.keys(process.env)) if (!(key in saved)) delete process.env[key];
      Object.assign(process.env, saved);
    });
    Object.assign(process.env, { CI: 'true', CONTINUOUS_INTEGRATION: '1', LENGTHWISE_PROBE: 'kept' });
    const colours = (depth: number) => ({ getColorDepth: () => depth }) as unknown as NodeJS.WriteStream;
    const env = screenEnv(colours(8), {});
    expect(env['CI']).toBeUndefined();
    expect(env['CONTINUOUS_INTEGRATION']).toBeUndefined();
    expect(env['LENGTHWISE_PROBE']).toBe('kept');
    expect(env['FORCE_COLOR']).toBe('2');
    expect(screenEnv(colours(24), {})['FORCE_COLOR']).toBe('3');
    expect(screenEnv(colours(1), {})['FORCE_COLOR']).toBe('0');
    // The main thread's own environment is left as it was.
    expect(process.env['CI']).toBe('true');
  });

  it('draws on this thread when standard output has no descriptor', async () => {
    const { keys } = terminal();
    const frames: string[] = [];
    const out = Object.assign(new EventEmitter(), { isTTY: true, columns: 80, rows: 24, write: (f: string) => frames.push(f) > 0 });
    const dashboard = startOnThread(out, keys);
    await waitFor(() => plain(frames.join('')).includes('SL 2.71 µm'), 'the panels written here');
    dashboard.unmount();
    await dashboard.waitUntilExit();
  });
});
