/**
 * The whole screen: status, alerts, one panel per muscle, the footer; keys for quit, freeze, marker,
 * calibration, focus, help and replay speed. It reads the trial's state and never drives the pipeline.
 */
import { Box, Text, useApp, useInput, type Key } from 'ink';
import { useCallback, useMemo, useRef, useState } from 'react';
import type { Observable, SchedulerLike } from 'rxjs';
import type { TrialState } from '../state.ts';
import AlertList from './alert-list.tsx';
import { PLAUSIBLE_SARCOMERE_UM } from './alerts.ts';
import CalibratePrompt, { parseCalibrationUm } from './calibrate-prompt.tsx';
import Footer from './footer.tsx';
import { clockTime, elapsed, fixed } from './format.ts';
import HelpOverlay from './help-overlay.tsx';
import { DEFAULT_CALIBRATION_UM, KEY_HELP, type KeyHelp } from './keys.ts';
import { chooseLayout } from './layout.ts';
import MusclePanel from './muscle-panel.tsx';
import ReplayBar from './replay-bar.tsx';
import type { DashboardStatus } from './status.ts';
import StatusBar from './status-bar.tsx';
import { createTheme } from './theme.ts';
import { useStatus } from './use-status.ts';
import { useTerminalSize } from './use-terminal-size.ts';
import { useTrialView } from './use-trial-view.ts';
import { detectAlerts } from './view-model.ts';

export interface Props {
  readonly state$: Observable<TrialState>;
  readonly status$?: Observable<DashboardStatus> | undefined;
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

type Mode = { readonly kind: 'normal' } | { readonly kind: 'help' } | { readonly kind: 'calibrate'; readonly muscle: string; readonly typed: string; readonly problem: string | null };

const FLASH_MS = 3000;
const MAX_ALERT_ROWS = 3;

export default function Dashboard(props: Props) {
  const { title, onQuit, onMarker, onSpeed, onCalibrate } = props;
  const theme = useMemo(() => createTheme(props.color ?? true), [props.color]);
  const [frozen, setFrozen] = useState(false);
  const [mode, setMode] = useState<Mode>({ kind: 'normal' });
  const [focusIndex, setFocusIndex] = useState(0);
  const [flash, setFlash] = useState<{ readonly text: string; readonly untilMs: number } | null>(null);
  const [markerCount, setMarkerCount] = useState(0);
  const { exit } = useApp();
  const size = useTerminalSize({
    ...(props.columns === undefined ? {} : { columns: props.columns }),
    ...(props.rows === undefined ? {} : { rows: props.rows }),
  });
  const view = useTrialView(props.state$, {
    ...(props.scheduler === undefined ? {} : { scheduler: props.scheduler }),
    ...(props.frameMs === undefined ? {} : { frameMs: props.frameMs }),
    frozen,
  });
  const status = useStatus(props.status$, props.scheduler, props.frameMs);
  const alerts = useMemo(() => detectAlerts(view, status, onCalibrate !== undefined), [view, status, onCalibrate]);

  const muscleCount = view.muscles.length;
  const focus = muscleCount === 0 ? 0 : Math.min(focusIndex, muscleCount - 1);
  const focused = view.muscles[focus];
  const keys: KeyHelp[] = KEY_HELP.filter((k) => {
    switch (k.needs) {
      case undefined:
        return true;
      case 'manyMuscles':
        return muscleCount > 1;
      default:
        return props[k.needs] !== undefined;
    }
  });
  const say = (text: string): void => setFlash({ text, untilMs: view.wallMs + FLASH_MS });

  const onKey = (input: string, key: Key): void => {
    if (mode.kind === 'calibrate') {
      if (key.escape) {
        setMode({ kind: 'normal' });
        say('calibration cancelled');
      } else if (key.return) {
        const parsed = parseCalibrationUm(mode.typed, DEFAULT_CALIBRATION_UM, PLAUSIBLE_SARCOMERE_UM);
        if (!parsed.ok) {
          setMode({ ...mode, problem: parsed.problem });
          return;
        }
        setMode({ kind: 'normal' });
        onCalibrate?.(mode.muscle, parsed.um);
        say(`calibration of ${mode.muscle} at ${fixed(parsed.um, 2)} µm asked for`);
      } else if (key.backspace || key.delete) {
        setMode({ ...mode, typed: mode.typed.slice(0, -1), problem: null });
      } else if (/^[0-9.,]+$/.test(input)) {
        setMode({ ...mode, typed: (mode.typed + input.replaceAll(',', '.')).slice(0, 8), problem: null });
      }
      return;
    }
    if (input === 'q' || (key.ctrl && input === 'c')) {
      onQuit();
      exit();
      return;
    }
    if (mode.kind === 'help') {
      if (input === '?' || key.escape) setMode({ kind: 'normal' });
      return;
    }
    if (input === '?') {
      setMode({ kind: 'help' });
    } else if (input === ' ') {
      setFrozen((f) => !f);
    } else if (input === 'm') {
      if (onMarker === undefined) {
        say('markers cannot be dropped here');
        return;
      }
      const n = markerCount + 1;
      setMarkerCount(n);
      onMarker(`marker ${n} at trial time ${elapsed(view.elapsedS)} (${clockTime((props.now ?? (() => new Date()))())})`);
      say(`marker ${n} dropped`);
    } else if (input === 'c') {
      if (onCalibrate === undefined) say('calibration cannot be captured here');
      else if (focused === undefined) say('no muscle to calibrate yet');
      else setMode({ kind: 'calibrate', muscle: focused.name, typed: '', problem: null });
    } else if (key.tab || key.rightArrow || key.downArrow) {
      if (muscleCount > 0) setFocusIndex(((key.shift ? focus - 1 : focus + 1) + muscleCount) % muscleCount);
    } else if (key.leftArrow || key.upArrow) {
      if (muscleCount > 0) setFocusIndex((focus - 1 + muscleCount) % muscleCount);
    } else if ((input === '+' || input === '=') && onSpeed !== undefined) {
      onSpeed(1);
    } else if ((input === '-' || input === '_') && onSpeed !== undefined) {
      onSpeed(-1);
    }
  };
  // Ink registers the handler in a passive effect; reading the newest one through a ref means a key
  // pressed right after a frame never acts on the state of the frame before.
  const onKeyRef = useRef(onKey);
  onKeyRef.current = onKey;
  useInput(useCallback((input: string, key: Key) => onKeyRef.current(input, key), []));

  const alertRows = Math.min(alerts.length, MAX_ALERT_ROWS);
  const promptRows = mode.kind === 'calibrate' ? 2 : 0;
  const reserved = 2 + (status.replay === undefined ? 0 : 1) + alertRows + promptRows + 1;
  // One row short of the terminal: a frame as tall as the terminal makes Ink clear the screen each frame.
  const layout = chooseLayout(size.columns, size.rows - 1, muscleCount, reserved);
  const flashText = flash !== null && view.wallMs < flash.untilMs ? flash.text : (status.message ?? null);

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
          {view.muscles.map((m, i) => (
            <MusclePanel
              key={m.name}
              muscle={m}
              layout={layout}
              theme={theme}
              focused={i === focus && muscleCount > 1}
              probability={status.regionProbability?.[m.name]}
            />
          ))}
        </Box>
      )}
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
      <Footer keys={keys} theme={theme} columns={size.columns} flash={flashText} />
    </Box>
  );
}
