/**
 * The dashboard on a thread of its own (see thread-messages.ts). This thread keeps what only it can do:
 * it makes the frames from the pipeline's state (plain numbers, copied to the other thread), reads the
 * keys in raw mode and follows the terminal's size. A frame is sent only once the last one was taken,
 * so a slow screen never makes frames pile up. If the dashboard's thread fails, the terminal is
 * restored, the failure is said on standard error, and the trial goes on without a screen.
 */
import { Worker } from 'node:worker_threads';
import type { Subscription } from 'rxjs';
import type { DashboardHandle, DashboardOptions } from './dashboard-options.ts';
import type { DashboardThreadSetup, FromDashboard, ToDashboard } from './thread-messages.ts';
import { colorEnabled } from '../view/theme.ts';
import { trialFrames, type TrialFrame } from '../view/trial-frames.ts';

/**
 * The screen's thread runs plain JavaScript from the build (build.js): the file beside this module's own
 * in dist/, or, when this module runs from the sources (the tests build dist/ before they start), the
 * built copy.
 */
const WORKER_FILE = import.meta.url.endsWith('.js')
  ? new URL('./dashboard-worker.js', import.meta.url)
  : new URL('../../../dist/dashboard-worker.js', import.meta.url);

/** Shows the cursor and leaves synchronized output, whatever state a failed thread left the screen in. */
const RESTORE_SCREEN = '\u001B[?2026l\u001B[?25h';

/**
 * The environment of the screen's thread. Its colour library reads the colours from its own standard
 * output, which on a worker thread is not the terminal, so they are told to it. And Ink, when it sees a
 * CI variable, holds every frame back until the end for the sake of CI logs: the screen is started only
 * on a terminal, so a CI variable left in a person's shell must not blank the live view.
 */
export function screenEnv(stdout: NodeJS.WriteStream, env: NodeJS.ProcessEnv): NodeJS.ProcessEnv {
  const { CI: _ci, CONTINUOUS_INTEGRATION: _continuous, ...rest } = process.env;
  if (typeof stdout.getColorDepth !== 'function') return rest;
  const depth = stdout.getColorDepth(env);
  return { ...rest, FORCE_COLOR: depth >= 24 ? '3' : depth >= 8 ? '2' : depth >= 4 ? '1' : '0' };
}

export function startDashboardThread(options: DashboardOptions, fd: number): DashboardHandle {
  const { stdout, stdin } = options;
  const keys = stdin.isTTY === true;
  const setup: DashboardThreadSetup = {
    title: options.title,
    color: colorEnabled(options.env),
    fd,
    columns: stdout.columns > 0 ? stdout.columns : 80,
    rows: stdout.rows > 0 ? stdout.rows : 24,
    keys,
    can: { marker: options.onMarker !== undefined, speed: options.onSpeed !== undefined, calibrate: options.onCalibrate !== undefined },
  };
  const worker = new Worker(WORKER_FILE, { workerData: setup, env: screenEnv(stdout, options.env) });
  const send = (message: ToDashboard): void => worker.postMessage(message);

  let waiting: TrialFrame | null = null;
  let taken = true;
  const offer = (frame: TrialFrame): void => {
    if (taken) {
      taken = false;
      send({ type: 'frame', frame });
    } else {
      waiting = frame;
    }
  };
  const frames: Subscription = trialFrames(options.state$, options.status$, {
    ...(options.scheduler === undefined ? {} : { scheduler: options.scheduler }),
    ...(options.frameMs === undefined ? {} : { frameMs: options.frameMs }),
  }).subscribe(offer);

  const onKeys = (data: Buffer | string): void => send({ type: 'keys', data: String(data) });
  const onResize = (): void => send({ type: 'resize', columns: stdout.columns, rows: stdout.rows });
  stdout.on('resize', onResize);
  if (keys) {
    stdin.setRawMode(true);
    stdin.setEncoding('utf8');
    stdin.on('data', onKeys);
    stdin.resume();
  }

  let ended = false;
  let settle: () => void = () => undefined;
  const exited = new Promise<void>((resolve) => {
    settle = resolve;
  });
  let showScreen: () => void = () => undefined;
  const shown = new Promise<void>((resolve) => {
    showScreen = resolve;
  });
  const end = (): void => {
    if (ended) return;
    ended = true;
    // A screen that failed or left before it was drawn is not waited for.
    showScreen();
    frames.unsubscribe();
    stdout.off('resize', onResize);
    if (keys) {
      stdin.off('data', onKeys);
      stdin.setRawMode(false);
      stdin.pause();
    }
    settle();
  };

  worker.on('message', (message: FromDashboard) => {
    switch (message.type) {
      case 'shown':
        showScreen();
        break;
      case 'took':
        taken = true;
        if (waiting !== null) {
          const next = waiting;
          waiting = null;
          offer(next);
        }
        break;
      case 'quit':
        options.onQuit();
        break;
      case 'marker':
        options.onMarker?.(message.text);
        break;
      case 'speed':
        options.onSpeed?.(message.direction);
        break;
      case 'calibrate':
        options.onCalibrate?.(message.muscle, message.sarcomereUm);
        break;
      case 'exited':
        end();
        void worker.terminate();
        break;
    }
  });
  worker.on('error', (error) => {
    stdout.write(RESTORE_SCREEN);
    process.stderr.write(`lengthwise: the dashboard stopped (${error.message}); the trial goes on, and q no longer works: end it with Ctrl+C\n`);
    end();
  });
  worker.on('exit', end);

  return {
    unmount: () => {
      if (!ended) send({ type: 'unmount' });
    },
    shown,
    waitUntilExit: () => exited,
  };
}
