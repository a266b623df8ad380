/**
 * The dashboard's own thread: draws the frames the main thread sends (see thread-messages.ts) with Ink
 * on the terminal's file descriptor, and sends back what the keys ask for.
 */
import { render } from 'ink';
import { readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';
import { parentPort, workerData } from 'node:worker_threads';
import { Subject } from 'rxjs';
import Dashboard from '../components/dashboard.tsx';
import type { DashboardThreadSetup, FromDashboard, ToDashboard } from './thread-messages.ts';
import type { TrialFrame } from '../view/trial-frames.ts';
import { shareFrame } from '../view/share-frame.ts';
import { ForwardedKeys, FdScreen } from './worker-terminal.ts';

/**
 * Lowers this thread's scheduling priority (Linux: a thread is a task of its own, found by
 * /proc/thread-self), so that on a busy machine the screen waits and ingestion does not. Elsewhere,
 * or when not allowed, the thread keeps the process's priority.
 */
function yieldToIngestion(): void {
  try {
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    if (Number.isInteger(tid) && tid > 0) setPriority(tid, SCREEN_NICENESS);
  } catch {
    // No /proc, or no permission: the screen shares the process's priority.
  }
}

/** Niceness of the dashboard's thread (0 normal, 19 lowest): under contention the pipeline comes first, and the screen may lag. */
const SCREEN_NICENESS = 19;

yieldToIngestion();
const port = parentPort;
if (port === null) throw new Error('dashboard-worker.tsx runs as a worker thread only');
const setup = workerData as DashboardThreadSetup;
const say = (message: FromDashboard): void => port.postMessage(message);

const screen = new FdScreen(setup.fd, setup.columns, setup.rows);
const keys = new ForwardedKeys(setup.keys);
const frames$ = new Subject<TrialFrame>();

const instance = render(
  <Dashboard
    frames$={frames$}
    title={setup.title}
    color={setup.color}
    onQuit={() => say({ type: 'quit' })}
    onMarker={setup.can.marker ? (text) => say({ type: 'marker', text }) : undefined}
    onSpeed={setup.can.speed ? (direction) => say({ type: 'speed', direction }) : undefined}
    onCalibrate={setup.can.calibrate ? (muscle, sarcomereUm) => say({ type: 'calibrate', muscle, sarcomereUm }) : undefined}
  />,
  {
    stdout: screen as unknown as NodeJS.WriteStream,
    stdin: keys as unknown as NodeJS.ReadStream,
    exitOnCtrlC: false,
    patchConsole: false,
    maxFps: 15,
  },
);

// render() has drawn the first screen: the main thread may start what the screen is there to show.
say({ type: 'shown' });

let showing: TrialFrame | null = null;
port.on('message', (message: ToDashboard) => {
  switch (message.type) {
    case 'frame':
      showing = shareFrame(showing, message.frame);
      frames$.next(showing);
      say({ type: 'took' });
      break;
    case 'keys':
      keys.push(message.data);
      break;
    case 'resize':
      screen.resize(message.columns, message.rows);
      break;
    case 'unmount':
      instance.unmount();
      break;
  }
});

void instance.waitUntilExit().finally(() => {
  say({ type: 'exited' });
  port.close();
});
