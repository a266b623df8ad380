import '../force-color.ts';
import { performance } from 'node:perf_hooks';
import { afterEach, describe, expect, it } from 'vitest';
import { BehaviorSubject, Observable, Subject, VirtualTimeScheduler } from 'rxjs';
import Dashboard, { type Props } from '../../../src/dashboard/components/dashboard.tsx';
import type { TrialState } from '../../../src/trial/state.ts';
import type { RunStatus } from '../../../src/trial/run-status.ts';
import { REACT_TIMINGS_DROP_MS } from '../../../src/dashboard/thread/start-dashboard.tsx';
import { MARKER_IN_BAND } from '../../../src/dashboard/view/curve-drawing.ts';
import { completeStride, makeMuscle, makeTrialState, pushSample, startStride, walkingState, walkThenFail } from '../fixtures.ts';
import { expectToContainEach } from '../../helpers/text-checks.ts';
import { COLOUR_SGR, frameWhere, hides, KEY, shows, waitFor, KeysIn, plain, renderScreen, ScreenOut, startWalking, tick, WAIT_LIMIT_MS, type Screen } from '../terminal-double.ts';

const screens: Screen[] = [];
afterEach(() => {
  for (const s of screens.splice(0)) s.instance.unmount();
});

/** The same stream, noting when the dashboard has subscribed (its effects run after the first frame). */
function watched<T>(source$: Observable<T>): { readonly stream$: Observable<T>; readonly subscribed: () => boolean } {
  let subscribed = false;
  const stream$ = new Observable<T>((subscriber) => {
    subscribed = true;
    const inner = source$.subscribe(subscriber);
    return () => inner.unsubscribe();
  });
  return { stream$, subscribed: () => subscribed };
}

/**
 * Waits until Ink has written what the last clock step asked for: no new frame over a few looks. React
 * may split a render into slices, so on a loaded machine one short wait can read the frame before.
 */
async function settled(screen: Screen): Promise<void> {
  for (let count = -1, same = 0; same < 4; ) {
    await tick(15);
    const now = screen.out.frames.length;
    same = now === count ? same + 1 : 0;
    count = now;
  }
}

/** Renders the dashboard on a virtual clock; `advance(ms)` moves the clock and runs what is due. */
function show(state$: Observable<TrialState>, more: Partial<Props> = {}, columns = 80, rows = 24) {
  const scheduler = new VirtualTimeScheduler(undefined, 0);
  const state = watched(state$);
  const status = more.status$ === undefined ? null : watched(more.status$);
  const advance = async (ms: number): Promise<void> => {
    await waitFor(() => state.subscribed() && (status === null || status.subscribed()), 'the dashboard subscribing');
    scheduler.maxFrames = scheduler.frame + ms;
    scheduler.flush();
    await settled(screen);
  };
  const screen = renderScreen(
    <Dashboard
      title="lengthwise"
      onQuit={() => undefined}
      scheduler={scheduler}
      {...more}
      state$={state.stream$}
      status$={status === null ? undefined : status.stream$}
    />,
    columns,
    rows,
  );
  screens.push(screen);
  return { screen, scheduler, advance };
}

/**
 * A trial's state shown (as a BehaviorSubject), its clock moved by `ms` so its frames are drawn; `send`
 * adds a sample to the state and sends the state on.
 */
async function showState(state: TrialState, ms: number, more: Partial<Props> = {}, columns = 80, rows = 24) {
  const state$ = new BehaviorSubject(state);
  const shown = show(state$, more, columns, rows);
  await shown.advance(ms);
  const send = (muscle: string, sample: Parameters<typeof pushSample>[2]): void => {
    pushSample(state, muscle, sample);
    state$.next(state);
  };
  return { ...shown, state, send };
}

/** The walking trial shown, its clock moved by `ms`. */
function showWalking(ms: number, more: Partial<Props> = {}, columns = 80, rows = 24) {
  return showState(walkingState(), ms, more, columns, rows);
}

describe('Dashboard', () => {
  it('waits for the first samples on an empty trial', async () => {
    const { screen, advance } = show(new Subject<TrialState>());
    await advance(300);
    await shows(screen, 'waiting for the first samples');
  });

  it('never says UNCALIBRATED for a calibrated trial, from its first frame on', async () => {
    // Before the trial's first state, then with a muscle declared by the header but no calibration yet
    // (it comes with the first sample), then calibrated from the header.
    const state$ = new Subject<TrialState>();
    const { screen, advance } = show(state$);
    await advance(100);
    const declared = makeTrialState([makeMuscle('calf', { calibrationSource: null })]);
    declared.calibrated = true;
    state$.next(declared);
    await advance(100);
    await shows(screen, 'calibration pending');
    state$.next(walkingState());
    await advance(300);
    await frameWhere(screen, (f) => /calibrated · t/.test(plain(f)), 'calibrated in the status line');
    expect(screen.out.frames.filter((f) => plain(f).includes('UNCALIBRATED'))).toEqual([]);
  });

  it('says UNCALIBRATED as soon as one muscle runs on the assumed baseline', async () => {
    const state = walkingState();
    state.muscles.set('shin', makeMuscle('shin', { side: 'right', calibrationSource: null }));
    state.muscles.set('foot', makeMuscle('foot', { side: 'right', calibrationSource: 'baseline' }));
    state.calibrated = false;
    const { screen } = await showState(state, 300);
    await shows(screen, 'UNCALIBRATED');
  });

  it('shows each muscle with its numbers and units', async () => {
    const { screen } = await showWalking(300);
    const text = plain(screen.lastFrame());
    expectToContainEach(text, ['calf', 'thigh', 'SL 2.71 µm', 'PLATEAU', 'DESCENDING', 'mm/s', '°']);
  });

  it('fits an 80×24 terminal with a row to spare', async () => {
    const { screen } = await showWalking(300, { status$: new BehaviorSubject<RunStatus>({ replay: { progress: 0.3, speed: 2 } }) });
    const lines = plain(screen.lastFrame()).split('\n');
    expect(lines.length).toBeLessThanOrEqual(23);
    for (const line of lines) expect([...line].length).toBeLessThanOrEqual(80);
  });

  it('uses colour by default and none at all when colour is off', async () => {
    const coloured = await showWalking(300);
    expect(coloured.screen.lastFrame()).toMatch(COLOUR_SGR);
    const bare = await showWalking(300, { color: false });
    expect(bare.screen.lastFrame()).not.toMatch(COLOUR_SGR);
    await shows(bare.screen, 'SL 2.71 µm');
  });

  it('follows a state mutated in place at a bounded frame rate', async () => {
    const state = walkingState();
    const state$ = new Subject<TrialState>();
    const { screen, advance } = show(state$, { frameMs: 80 });
    state$.next(state);
    await advance(100);
    await shows(screen, 'SL 2.71 µm');
    const framesBefore = screen.out.frames.length;
    for (let i = 1; i <= 20; i++) {
      pushSample(state, 'calf', { tS: 5 + i / 100, sarcomereUm: 2.71 + i / 100 });
      state$.next(state);
    }
    await advance(100);
    await shows(screen, 'SL 2.91 µm');
    // Twenty batches inside one frame interval are shown once: no frame shows a length between.
    const shown = new Set(
      screen.out.frames.slice(framesBefore).flatMap((f) => [...plain(f).matchAll(/calf[^]*?SL (\d\.\d\d) µm/g)].map((m) => m[1])),
    );
    expect([...shown].filter((sl) => sl !== '2.71' && sl !== '2.91')).toEqual([]);
  });

  it('follows a resize, side by side when wide and stacked when narrow', async () => {
    const { screen } = await showWalking(300, {}, 100, 40);
    const wide = plain(screen.lastFrame()).split('\n');
    const calfRow = wide.findIndex((l) => l.includes('calf'));
    expect(wide[calfRow]).toContain('thigh');
    screen.out.resize(60, 40);
    await frameWhere(screen, (f) => {
      const lines = plain(f).split('\n');
      const row = lines.findIndex((l) => l.includes('calf'));
      return row >= 0 && !(lines[row] ?? '').includes('thigh') && lines.some((l) => l.includes('thigh'));
    }, 'with the panels stacked');
  });

  it('keeps the status in view on a small terminal: one panel for the focused muscle, a line for the others', async () => {
    const state = walkingState();
    state.muscles.set('shin', makeMuscle('shin', { side: 'right', calibrationSource: 'baseline' }));
    state.calibrated = false;
    pushSample(state, 'shin', { tS: 5, sarcomereUm: 2.4 });
    const { screen } = await showState(state, 300, { title: 'lengthwise live ws://127.0.0.1:8750/stream/with/a/long/path' }, 60, 24);
    await shows(screen, 'UNCALIBRATED');
    const lines = plain(screen.lastFrame()).split('\n');
    expect(lines.length).toBeLessThanOrEqual(23);
    expect(lines[0]).toContain('UNCALIBRATED');
    expect(lines[0]).toContain('t 0:05.0');
    expect(lines.some((l) => /^\s+thigh right\s+SL 3\.05 µm\s+DESCENDING/.test(l))).toBe(true);
    expect(lines.some((l) => /^\s+shin right\s+SL 2\.40 µm/.test(l))).toBe(true);
    await screen.press(KEY.tab);
    await frameWhere(screen, (f) => plain(f).split('\n').some((l) => /^\s+calf left\s+SL 2\.71 µm/.test(l)), 'calf as a line once thigh has the panel');
    await shows(screen, '▸ thigh');
  });

  it('shows a dash for values that are not numbers and never fails on them', async () => {
    const state = makeTrialState([makeMuscle('calf', { calibrationSource: null })]);
    pushSample(state, 'calf', { tS: 1, sarcomereUm: Number.NaN, velocityMmS: Number.NaN, pennationDeg: Number.NaN });
    const calf = state.muscles.get('calf');
    if (calf?.latest != null) calf.latest.region = null;
    startStride(state, 'calf', { slMinUm: Number.POSITIVE_INFINITY, slMaxUm: Number.NEGATIVE_INFINITY });
    const { screen } = await showState(state, 300);
    await shows(screen, 'SL – µm  –');
    await shows(screen, 'velocity – mm/s');
    await shows(screen, 'calibration pending');
  });

  it('says the pipeline stopped, keeping the last figures, when the state stream fails', async () => {
    const state$ = new Subject<TrialState>();
    const { screen, advance } = show(state$);
    await advance(10);
    walkThenFail(state$, 'the trial file could not be read: permission denied');
    await advance(300);
    await shows(screen, '! the pipeline stopped: the trial file could not be read: permission denied');
    await shows(screen, 'SL 2.71 µm');
  });

  it('moves the marker along the curve when the sarcomere length changes', async () => {
    const state = makeTrialState([makeMuscle('calf')]);
    pushSample(state, 'calf', { tS: 1, sarcomereUm: 2.2 });
    const { screen, advance, send } = await showState(state, 300);
    const markerCol = (): number => {
      const line = plain(screen.lastFrame()).split('\n').find((l) => l.includes(MARKER_IN_BAND)) ?? '';
      return [...line].indexOf(MARKER_IN_BAND);
    };
    const before = markerCol();
    expect(before).toBeGreaterThan(0);
    send('calf', { tS: 1.1, sarcomereUm: 3.2 });
    await advance(300);
    expect(markerCol()).toBeGreaterThan(before);
  });

  it('gives the region its probability from the trial state when the calibration states an uncertainty, and the capacity', async () => {
    const state = makeTrialState([makeMuscle('calf'), makeMuscle('thigh', { side: 'right' })]);
    pushSample(state, 'calf', { tS: 1, sarcomereUm: 2.72, forceLv: 0.84 });
    pushSample(state, 'thigh', { tS: 1, sarcomereUm: 3.2 });
    const calf = state.muscles.get('calf');
    if (calf !== undefined) calf.regionProbability = { too_short: 0, steep_ascending: 0, shallow_ascending: 0.2, plateau: 0.74, descending: 0.06, no_overlap: 0 };
    const { screen } = await showState(state, 300);
    await shows(screen, 'PLATEAU 74%');
    await shows(screen, 'DESCENDING');
    expect(screen.lastFrame()).not.toMatch(/DESCENDING \d/);
    await shows(screen, 'capacity 0.84');
  });

  it('marks strides estimated from the fascicle signal', async () => {
    const state = makeTrialState([makeMuscle('calf')]);
    completeStride(state, 'calf', { slMinUm: 2.31, slMaxUm: 2.88 });
    const calf = state.muscles.get('calf');
    if (calf !== undefined) calf.segmentation = 'estimated';
    pushSample(state, 'calf', { tS: 3, sarcomereUm: 2.7 });
    const { screen } = await showState(state, 300, {}, 80, 30);
    await shows(screen, '≈1 2.31–2.88');
  });

  it('lists the last strides, newest first, with their SL range, main region and share', async () => {
    const state = makeTrialState([makeMuscle('calf')]);
    completeStride(state, 'calf', { slMinUm: 2.31, slMaxUm: 2.88, regionFraction: { plateau: 0.7, descending: 0.3 } });
    completeStride(state, 'calf', { slMinUm: 2.45, slMaxUm: 3.12, regionFraction: { plateau: 0.35, descending: 0.65 } });
    pushSample(state, 'calf', { tS: 3, sarcomereUm: 2.7 });
    const { screen } = await showState(state, 300, {}, 80, 30);
    const lines = plain(screen.lastFrame()).split('\n');
    const second = lines.findIndex((l) => /\b2 2\.45–3\.12 descending\s+65%/.test(l));
    const first = lines.findIndex((l) => /\b1 2\.31–2\.88 plateau\s+70%/.test(l));
    expect(second).toBeGreaterThan(0);
    expect(first).toBe(second + 1);
  });

  it('raises an alert when a muscle stops while another flows, and clears it when samples return', async () => {
    const { screen, advance, send } = await showWalking(300);
    await hides(screen, 'no samples');
    for (let i = 1; i <= 15; i++) {
      send('thigh', { tS: 5 + i / 10, sarcomereUm: 3 });
      await advance(100);
    }
    await shows(screen, 'calf: no samples for');
    send('calf', { tS: 6.6, sarcomereUm: 2.7 });
    await advance(100);
    await hides(screen, 'no samples');
  });

  it('shouts UNCALIBRATED when the trial runs on the baseline assumption', async () => {
    const state = makeTrialState([makeMuscle('calf', { calibrationSource: 'baseline' })]);
    pushSample(state, 'calf', { tS: 1, sarcomereUm: 2.7 });
    const { screen } = await showState(state, 300, { onCalibrate: () => undefined });
    const text = plain(screen.lastFrame());
    expectToContainEach(text, [' UNCALIBRATED ', '! UNCALIBRATED (first 3 s taken as mid-plateau): give --calibration or press c', 'calf left · uncalibrated']);
  });

  it('shows a disconnection from the status stream, and the replay progress and speed', async () => {
    const status$ = new BehaviorSubject<RunStatus>({ connection: { state: 'reconnecting', retryInS: 4 }, logPath: 'sessions/walk.log' });
    const { screen, advance } = await showWalking(300, { status$ });
    await shows(screen, 'DISCONNECTED — reconnecting in 4 s');
    await shows(screen, 'log sessions/walk.log');
    status$.next({ connection: { state: 'connected' }, replay: { progress: 0.5, speed: 4 } });
    await advance(300);
    const text = plain(screen.lastFrame());
    expect(text).not.toContain('DISCONNECTED');
    expect(text).toContain('50%');
    expect(text).toContain('4×');
  });

  it('quits on q: calls onQuit and unmounts', async () => {
    let quits = 0;
    const { screen } = await showWalking(100, { onQuit: () => (quits += 1) });
    const exited = screen.instance.waitUntilExit();
    await screen.press('q');
    await exited;
    expect(quits).toBe(1);
  });

  it('freezes the display on space while the state goes on, and resumes on space', async () => {
    const { screen, advance, send } = await showWalking(100);
    await screen.press(' ');
    await advance(100);
    await shows(screen, 'FROZEN');
    send('calf', { tS: 6, sarcomereUm: 3.01 });
    await advance(500);
    await shows(screen, 'SL 2.71 µm');
    await screen.press(' ');
    await advance(100);
    await shows(screen, 'SL 3.01 µm');
    await hides(screen, 'FROZEN');
  });

  it('drops a timestamped marker on m', async () => {
    const markers: string[] = [];
    const { screen, advance } = await showWalking(100, { onMarker: (text) => markers.push(text), now: () => new Date(2026, 0, 1, 14, 3, 9) });
    await screen.press('m', 'm');
    await waitFor(() => markers.length === 2, 'two markers');
    expect(markers).toEqual(['marker 1 at trial time 0:05.0 (14:03:09)', 'marker 2 at trial time 0:05.0 (14:03:09)']);
    await advance(100);
    await shows(screen, 'marker 2 placed');
    await screen.press(' ');
    await shows(screen, 'FROZEN');
    await advance(3000);
    await hides(screen, 'marker 2 placed');
  });

  it('asks the sarcomere length on c and calibrates the focused muscle, 2.7 µm by default', async () => {
    const calls: [string, number][] = [];
    const { screen } = await showWalking(100, { onCalibrate: (m, um) => calls.push([m, um]) });
    await screen.press('c');
    await shows(screen, 'calibrate calf from the last 3 s');
    await screen.press(KEY.enter);
    await waitFor(() => calls.length === 1, 'the first calibration');
    expect(calls).toEqual([['calf', 2.7]]);
    await screen.press(KEY.tab, 'c', '2', ',', '6', '5', KEY.enter);
    await waitFor(() => calls.length === 2, 'the second calibration');
    expect(calls).toEqual([['calf', 2.7], ['thigh', 2.65]]);
  });

  it('refuses a calibration length outside the plausible range, says what is accepted, and cancels on Esc', async () => {
    const calls: [string, number][] = [];
    let quits = 0;
    const { screen, advance } = await showWalking(100, { onCalibrate: (m, um) => calls.push([m, um]), onQuit: () => (quits += 1) });
    await screen.press('c', '9', KEY.enter);
    await shows(screen, '"9" is not a usable sarcomere length: type a number of µm from 1 to 5');
    await screen.press('q');
    expect(quits).toBe(0);
    await screen.press(KEY.escape);
    await advance(100);
    await hides(screen, 'calibrate calf from');
    expect(calls).toEqual([]);
  });

  it('changes the replay speed on + and -, only when the command offers it', async () => {
    const speeds: number[] = [];
    const offered = await showWalking(100, { onSpeed: (d) => speeds.push(d) });
    await offered.screen.press('+', '=', '-');
    await waitFor(() => speeds.length === 3, 'three speed changes');
    expect(speeds).toEqual([1, 1, -1]);
    await shows(offered.screen, '+ - speed');
    const plainReplay = await showWalking(100);
    await hides(plainReplay.screen, 'speed');
  });

  it('moves the focus with tab and the arrows', async () => {
    const { screen } = await showWalking(100);
    await shows(screen, '▸ calf');
    await screen.press(KEY.tab);
    await shows(screen, '▸ thigh');
    await screen.press(KEY.right);
    await shows(screen, '▸ calf');
    await screen.press(KEY.left);
    await shows(screen, '▸ thigh');
  });

  it('takes keys that arrive together one by one', async () => {
    const markers: string[] = [];
    const { screen } = await showWalking(100, { onMarker: (t) => markers.push(t) });
    await screen.press(' m?');
    await waitFor(() => markers.length === 1, 'the marker');
    await shows(screen, 'FROZEN');
    await shows(screen, 'reading a panel');
  });

  it('takes a calibration typed in one go, Enter included', async () => {
    const calls: [string, number][] = [];
    const { screen } = await showWalking(100, { onCalibrate: (m, um) => calls.push([m, um]) });
    await screen.press('c2.6\r');
    await waitFor(() => calls.length === 1, 'the calibration');
    expect(calls).toEqual([['calf', 2.6]]);
  });

  it('shows each region\'s fill character in the help when there is no colour', async () => {
    const { screen } = await showWalking(100, { color: false });
    await screen.press('?');
    await shows(screen, 'reading a panel');
    const text = plain(screen.lastFrame());
    expect(text).toContain('too short · ▓ steep ascending · ▒ shallow ascending');
    expect(text).toContain('█ plateau · ░ descending · no overlap');
  });

  it('opens and closes the help on ?', async () => {
    const { screen } = await showWalking(100);
    await screen.press('?');
    await shows(screen, 'reading a panel');
    await screen.press('?');
    await hides(screen, 'reading a panel');
  });
});

describe('startDashboard', () => {
  function terminal() {
    return { out: new ScreenOut(80, 24), keys: new KeysIn() };
  }

  it('drops the timing entries React’s development build records as it draws, and only those', async () => {
    const { out, keys } = terminal();
    const scheduler = new VirtualTimeScheduler(undefined, 0);
    // React names its entries after the component, behind a zero-width space; under the test runner it
    // records none (its console has no timeStamp), so entries of that form stand in for them.
    const reactLike = ['\u200BMusclePanel', '\u200BCurvePlot'];
    const reactTimings = (): number => performance.getEntriesByType('measure').filter((e) => e.name.startsWith('\u200B')).length;
    const dashboard = startWalking(out, keys, { scheduler });
    performance.mark('lengthwise-own-start');
    performance.measure('lengthwise-own', 'lengthwise-own-start');
    for (let i = 0; i < 50; i++) for (const name of reactLike) performance.measure(name, { start: 0, end: 1, detail: { properties: [['Changed Props', '']] } });
    expect(reactTimings()).toBe(100);
    scheduler.maxFrames = REACT_TIMINGS_DROP_MS - 1;
    scheduler.flush();
    expect(reactTimings()).toBe(100);
    scheduler.maxFrames = REACT_TIMINGS_DROP_MS;
    scheduler.flush();
    expect(reactTimings()).toBe(0);
    expect(performance.getEntriesByName('lengthwise-own')).toHaveLength(1);
    performance.clearMeasures('lengthwise-own');
    performance.clearMarks('lengthwise-own-start');
    dashboard.unmount();
    await dashboard.waitUntilExit();
    // Stopped with the dashboard.
    performance.measure(reactLike[0] ?? '', { start: 0, end: 1 });
    scheduler.maxFrames = 3 * REACT_TIMINGS_DROP_MS;
    scheduler.flush();
    expect(reactTimings()).toBe(1);
    performance.clearMeasures(reactLike[0]);
  });

  /** All the dashboard wrote, started on the walking trial in this environment, until its panels were up. */
  async function writtenIn(env: NodeJS.ProcessEnv): Promise<string> {
    const { out, keys } = terminal();
    const dashboard = startWalking(out, keys, { env, frameMs: 10 });
    await waitFor(() => plain(out.frames.join('')).includes('SL 2.71 µm'), 'the panels');
    dashboard.unmount();
    await dashboard.waitUntilExit();
    return out.frames.join('');
  }

  it('renders without any colour code when NO_COLOR is set', async () => {
    const all = await writtenIn({ NO_COLOR: '1' });
    expect(plain(all)).toContain('SL 2.71 µm');
    expect(all).not.toMatch(COLOUR_SGR);
  });

  it('uses colour when NO_COLOR is empty or absent', async () => {
    expect(await writtenIn({ NO_COLOR: '' })).toMatch(COLOUR_SGR);
  });

  it('still shows the trial when standard input is not a terminal, and says keys are off', async () => {
    const out = new ScreenOut(80, 24);
    const keys = new KeysIn();
    keys.isTTY = undefined;
    const dashboard = startWalking(out, keys, { frameMs: 10 });
    const panels = (): string | undefined => out.frames.map(plain).find((f) => f.includes('SL 2.71 µm'));
    await waitFor(() => panels() !== undefined, 'the panels');
    expect(panels()).toContain('no keys: standard input is not a terminal');
    dashboard.unmount();
    await dashboard.waitUntilExit();
  });

  it('calls onQuit on q and resolves waitUntilExit, unsubscribing from the state', async () => {
    const { out, keys } = terminal();
    const state$ = new BehaviorSubject(walkingState());
    let quits = 0;
    const dashboard = startWalking(out, keys, { state$, onQuit: () => (quits += 1) });
    await waitFor(() => keys.listenerCount('readable') > 0, 'the dashboard listening to keys');
    keys.write('q');
    await dashboard.waitUntilExit();
    expect(quits).toBe(1);
    expect(state$.observed).toBe(false);
  });

  it('resolves waitUntilExit even when first asked after the dashboard has gone', async () => {
    const { out, keys } = terminal();
    const dashboard = startWalking(out, keys);
    await waitFor(() => keys.listenerCount('readable') > 0, 'the dashboard listening to keys');
    keys.write('q');
    await tick(50);
    await expect(Promise.race([dashboard.waitUntilExit().then(() => 'exited'), tick(WAIT_LIMIT_MS).then(() => 'still waiting')])).resolves.toBe('exited');
  });
});
