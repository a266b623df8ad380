/**
 * The entry point the replay and live commands call: renders the dashboard on the given terminal.
 * `state$` is subscribed once; if the command also subscribes to it, pass a shared (hot) observable.
 * q (or Ctrl+C) calls onQuit and then unmounts the dashboard, so waitUntilExit() resolves.
 */
import { render } from 'ink';
import { performance } from 'node:perf_hooks';
import { asyncScheduler, interval } from 'rxjs';
import Dashboard from '../components/dashboard.tsx';
import { startDashboardThread } from './start-dashboard-thread.ts';
import type { DashboardHandle, DashboardOptions } from './dashboard-options.ts';
import { colorEnabled } from '../view/theme.ts';

export type { RunStatus } from '../../trial/run-status.ts';
export type { DashboardHandle, DashboardOptions } from './dashboard-options.ts';

/** How often the development build's timing entries are dropped (see dropReactTimings). */
export const REACT_TIMINGS_DROP_MS = 1000;

/**
 * React's development build (NODE_ENV not "production") records a performance measure, with a diff of
 * the props, for each component it draws again, and Node keeps every one: some 3 MB a second at 4 muscles (measured),
 * so a long session would run out of memory. Its entries are named with a leading zero-width space;
 * only those are dropped.
 */
export function dropReactTimings(): void {
  const names = new Set<string>();
  for (const entry of performance.getEntriesByType('measure')) if (entry.name.startsWith('\u200B')) names.add(entry.name);
  for (const name of names) performance.clearMeasures(name);
}

export function startDashboard(options: DashboardOptions): DashboardHandle {
  const fd = (options.stdout as { fd?: unknown }).fd;
  if (options.thread === 'own' && typeof fd === 'number' && options.stdout.isTTY === true) return startDashboardThread(options, fd);
  const instance = render(
    <Dashboard
      state$={options.state$}
      status$={options.status$}
      title={options.title}
      color={colorEnabled(options.env)}
      onQuit={options.onQuit}
      onMarker={options.onMarker}
      onSpeed={options.onSpeed}
      onCalibrate={options.onCalibrate}
      scheduler={options.scheduler}
      frameMs={options.frameMs}
    />,
    { stdout: options.stdout, stdin: options.stdin, exitOnCtrlC: false, patchConsole: false, maxFps: 15 },
  );
  const timings = interval(REACT_TIMINGS_DROP_MS, options.scheduler ?? asyncScheduler).subscribe(dropReactTimings);
  // Asked for now: Ink makes this promise on first request, and one first asked after the exit never settles.
  const exited = instance.waitUntilExit().then(() => undefined);
  exited.finally(() => timings.unsubscribe()).catch(() => undefined);
  exited.catch(() => undefined);
  return {
    // render() draws the first screen before it returns.
    shown: Promise.resolve(),
    unmount: () => {
      timings.unsubscribe();
      instance.unmount();
    },
    waitUntilExit: () => exited,
  };
}
