/**
 * The whole screen: status, alerts, one panel per muscle, the footer; keys for quit, freeze, marker,
 * calibration, focus, help and replay speed. It reads the trial's state and never drives the pipeline.
 */
import { Box, Text, useApp, useInput, useStdin, type Key } from 'ink';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { asyncScheduler, NEVER, type Observable, type SchedulerLike } from 'rxjs';
import type { TrialState } from '../../trial/state.ts';
import AlertList from './alert-list.tsx';
import CalibratePrompt from './calibrate-prompt.tsx';
import Footer from './footer.tsx';
import HelpOverlay from './help-overlay.tsx';
import { handleKey, INITIAL_UI, keyOfChar, type UiState } from '../view/key-handler.ts';
import { DEFAULT_CALIBRATION_UM, KEY_HELP, type KeyHelp } from '../view/keys.ts';
import { chooseLayout } from '../view/layout.ts';
import MuscleLine from './muscle-line.tsx';
import MusclePanel from './muscle-panel.tsx';
import ReplayBar from './replay-bar.tsx';
import type { RunStatus } from '../../trial/run-status.ts';
import StatusBar from './status-bar.tsx';
import { createTheme } from '../view/theme.ts';
import { useTerminalSize } from '../hooks/use-terminal-size.ts';
import { firstFrame, trialFrames, type TrialFrame } from '../view/trial-frames.ts';
import { useFrames } from '../hooks/use-frames.ts';
import { detectAlerts } from '../view/view-model.ts';
import { alertListRows, sameAlerts, type Alert } from '../view/alerts.ts';

export interface Props {
  /** The pipeline's state, turned into frames on this thread (with status$). */
  readonly state$?: Observable<TrialState> | undefined;
  readonly status$?: Observable<RunStatus> | undefined;
  /** Frames made elsewhere (another thread); when given, state$ and status$ are not read. */
  readonly frames$?: Observable<TrialFrame> | undefined;
  readonly title: string;
  /** false when NO_COLOR is set. @default true */
  readonly color?: boolean;
  readonly onQuit: () => void;
  readonly onMarker?: ((text: string) => void) | undefined;
  readonly onSpeed?: ((direction: 1 | -1) => void) | undefined;
  readonly onCalibrate?: ((muscle: string, sarcomereUm: number) => void) | undefined;
  /** Clock and timers. @default asyncScheduler */
  readonly scheduler?: SchedulerLike | undefined;
  /** @default 80 */
  readonly frameMs?: number | undefined;
  /** Wall clock for marker texts. @default () => new Date() */
  readonly now?: (() => Date) | undefined;
  /** Fixed size instead of the terminal's (tests). */
  readonly columns?: number | undefined;
  readonly rows?: number | undefined;
}

const FLASH_MS = 3000;

const MAX_ALERT_ROWS = 3;

export default function Dashboard(props: Props) {
  const { title, onQuit, onMarker, onSpeed, onCalibrate } = props;
  const theme = useMemo(() => createTheme(props.color ?? true), [props.color]);
  const ui = useRef<UiState>(INITIAL_UI);
  const [, setUiVersion] = useState(0);
  const [flash, setFlash] = useState<{ readonly text: string; readonly id: number } | null>(null);
  const scheduler = props.scheduler ?? asyncScheduler;
  // A message clears itself after a while, frozen display or not.
  useEffect(() => {
    if (flash === null) return undefined;
    const timer = scheduler.schedule(() => setFlash((f) => (f?.id === flash.id ? null : f)), FLASH_MS);
    return () => timer.unsubscribe();
  }, [flash, scheduler]);
  const { frozen, mode } = ui.current;
  const { exit } = useApp();
  const { isRawModeSupported } = useStdin();
  const size = useTerminalSize({
    ...(props.columns === undefined ? {} : { columns: props.columns }),
    ...(props.rows === undefined ? {} : { rows: props.rows }),
  });
  // The trial's view and the status arrive together, one frame at a time.
  const { state$, status$, frameMs } = props;
  const frames$ = useMemo(
    () => props.frames$ ?? trialFrames(state$ ?? NEVER, status$, { scheduler, ...(frameMs === undefined ? {} : { frameMs }) }),
    [props.frames$, state$, status$, scheduler, frameMs],
  );
  const { view, status } = useFrames(frames$, frozen, () => firstFrame(scheduler.now()));
  // The same alerts as the frame before keep their array, so the list is not drawn again.
  const shownAlerts = useRef<readonly Alert[]>([]);
  const alerts = useMemo(() => {
    const found = detectAlerts(view, status, onCalibrate !== undefined);
    if (!sameAlerts(found, shownAlerts.current)) shownAlerts.current = found;
    return shownAlerts.current;
  }, [view, status, onCalibrate]);

  const muscleCount = view.muscles.length;
  const focus = muscleCount === 0 ? 0 : Math.min(ui.current.focus, muscleCount - 1);
  const manyMuscles = muscleCount > 1;
  const can = { onMarker: onMarker !== undefined, onSpeed: onSpeed !== undefined, onCalibrate: onCalibrate !== undefined };
  const keys: readonly KeyHelp[] = useMemo(
    () =>
      KEY_HELP.filter((k) => {
        switch (k.needs) {
          case undefined:
            return true;
          case 'manyMuscles':
            return manyMuscles;
          default:
            return can[k.needs];
        }
      }),
    // The flags, not the callbacks: a new callback each render keeps the same keys.
    [manyMuscles, can.onMarker, can.onSpeed, can.onCalibrate],
  );
  const onKey = (input: string, key: Key): void => {
    const step = handleKey(ui.current, input, key, {
      muscles: view.muscles.map((m) => m.name),
      elapsedS: view.elapsedS,
      now: props.now ?? (() => new Date()),
      canMark: onMarker !== undefined,
      canCalibrate: onCalibrate !== undefined,
      canChangeSpeed: onSpeed !== undefined,
      plausibleUm: status.plausibleUm,
    });
    if (step.ui !== ui.current) {
      ui.current = step.ui;
      setUiVersion((v) => v + 1);
    }
    for (const effect of step.effects) {
      switch (effect.kind) {
        case 'quit':
          onQuit();
          exit();
          break;
        case 'marker':
          onMarker?.(effect.text);
          break;
        case 'calibrate':
          onCalibrate?.(effect.muscle, effect.sarcomereUm);
          break;
        case 'speed':
          onSpeed?.(effect.direction);
          break;
        case 'say':
          setFlash((f) => ({ text: effect.text, id: (f?.id ?? 0) + 1 }));
          break;
      }
    }
  };
  // Ink registers the handler in a passive effect; reading the newest one through a ref means a key
  // pressed right after a frame never acts on the state of the frame before.
  const onKeyRef = useRef(onKey);
  onKeyRef.current = onKey;
  useInput(
    useCallback((input: string, key: Key) => {
      // Keys typed faster than a frame (or sent by a script) arrive as one string: take them one by one.
      if (input.length > 1 && !key.meta && !input.includes('\u001B')) {
        for (const char of input) onKeyRef.current(...keyOfChar(char));
      } else {
        onKeyRef.current(input, key);
      }
    }, []),
    // Keys need a terminal on standard input; without one the screen still shows, and the footer says so.
    { isActive: isRawModeSupported === true },
  );

  const alertRows = alertListRows(alerts, size.columns, MAX_ALERT_ROWS);
  const promptRows = mode.kind === 'calibrate' ? 2 : 0;
  const reserved = 2 + (status.replay === undefined ? 0 : 1) + alertRows + promptRows + 1;
  // One row short of the terminal: a frame as tall as the terminal makes Ink clear the screen each frame.
  // The same layout object while nothing it depends on changes: the panels are memoized on it.
  const layout = useMemo(() => chooseLayout(size.columns, size.rows - 1, muscleCount, reserved), [size.columns, size.rows, muscleCount, reserved]);
  const flashText = flash?.text ?? status.message ?? null;

  return (
    <Box flexDirection="column" width={size.columns}>
      <StatusBar title={title} view={view} status={status} theme={theme} frozen={frozen} columns={size.columns} />
      {status.replay === undefined ? null : (
        <ReplayBar replay={status.replay} theme={theme} columns={size.columns} speedKeys={onSpeed !== undefined} />
      )}
      <AlertList alerts={alerts} theme={theme} columns={size.columns} maxRows={MAX_ALERT_ROWS} />
      {mode.kind === 'help' ? (
        <HelpOverlay keys={keys} theme={theme} columns={size.columns} />
      ) : muscleCount === 0 ? (
        <Box paddingX={1} paddingY={1}>
          <Text {...theme.role('label')}>{view.error === null ? 'waiting for the first samples…' : 'no samples arrived before the pipeline stopped'}</Text>
        </Box>
      ) : (
        <Box flexDirection="row" flexWrap="wrap" width={size.columns}>
          {view.muscles.map((m, i) =>
            layout.compact && i !== focus ? null : (
              <MusclePanel
                key={m.name}
                muscle={m}
                layout={layout}
                theme={theme}
                focused={i === focus && muscleCount > 1}
              />
            ),
          )}
        </Box>
      )}
      {layout.compact && mode.kind !== 'help' ? (
        <Box flexDirection="column" width={size.columns}>
          {view.muscles.map((m, i) => (i === focus ? null : <MuscleLine key={m.name} muscle={m} theme={theme} />))}
        </Box>
      ) : null}
      {mode.kind === 'calibrate' ? (
        <CalibratePrompt
          muscle={mode.muscle}
          typed={mode.typed}
          defaultUm={DEFAULT_CALIBRATION_UM}
          problem={mode.problem}
          theme={theme}
          columns={size.columns}
        />
      ) : null}
      <Footer
        keys={keys}
        theme={theme}
        columns={size.columns}
        flash={flashText}
        noKeys={isRawModeSupported !== true}
      />
    </Box>
  );
}
