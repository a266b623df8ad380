import { afterEach, describe, expect, it } from 'vitest';
import { Text } from 'ink';
import { useMemo } from 'react';
import { NEVER, Subject, VirtualTimeScheduler, type Observable } from 'rxjs';
import { useFrames } from '../../../src/dashboard/hooks/use-frames.ts';
import { firstFrame, trialFrames, type TrialFrame, type TrialFramesOptions } from '../../../src/dashboard/view/trial-frames.ts';
import type { RunStatus } from '../../../src/trial/run-status.ts';
import type { TrialState } from '../../../src/trial/state.ts';
import { pushSample, walkingState, walkThenFail } from '../fixtures.ts';
import { renderScreen, shows, tick, waitFor, type Screen } from '../terminal-double.ts';

/** The frames of a trial's state and status, shown through useFrames (frozen: the shown frame stays). */
function useTrialFrame(
  state$: Observable<TrialState>,
  status$: Observable<RunStatus> | undefined,
  options: TrialFramesOptions & { readonly scheduler: VirtualTimeScheduler; readonly frozen?: boolean },
): TrialFrame {
  const { scheduler, frameMs, tickMs } = options;
  const frames$ = useMemo(
    () => trialFrames(state$, status$, { scheduler, ...(frameMs === undefined ? {} : { frameMs }), ...(tickMs === undefined ? {} : { tickMs }) }),
    [state$, status$, scheduler, frameMs, tickMs],
  );
  return useFrames(frames$, options.frozen ?? false, () => firstFrame(scheduler.now()));
}

function Probe({ state$, scheduler, frozen = false }: { readonly state$: Observable<TrialState>; readonly scheduler: VirtualTimeScheduler; readonly frozen?: boolean }) {
  const { view } = useTrialFrame(state$, undefined, { scheduler, frameMs: 80, tickMs: 250, frozen });
  const calf = view.muscles[0]?.latest?.sarcomereUm;
  return <Text>{`muscles=${view.muscles.length} calf=${calf ?? 'none'} error=${view.error ?? 'none'}`}</Text>;
}

function StatusProbe({
  status$,
  scheduler,
  state$ = NEVER,
  onFrame,
}: {
  readonly status$: Observable<RunStatus>;
  readonly scheduler: VirtualTimeScheduler;
  readonly state$?: Observable<TrialState>;
  readonly onFrame?: () => void;
}) {
  const { view, status } = useTrialFrame(state$, status$, { scheduler, frameMs: 80, tickMs: 250 });
  onFrame?.();
  const calf = view.muscles[0]?.latest?.sarcomereUm;
  return <Text>{`log=${status.logPath ?? 'none'} conn=${status.connection?.state ?? 'none'} calf=${calf ?? 'none'}`}</Text>;
}

const screens: Screen[] = [];
afterEach(() => {
  for (const s of screens.splice(0)) s.instance.unmount();
});

function setup() {
  const scheduler = new VirtualTimeScheduler(undefined, 0);
  const advance = async (ms: number) => {
    scheduler.maxFrames = scheduler.frame + ms;
    scheduler.flush();
    await tick(5);
  };
  return { scheduler, advance };
}

/** A Probe on a state stream of its own, once the hook has subscribed; a kept screen is unmounted after the test. */
async function probe({ keep = true }: { readonly keep?: boolean } = {}) {
  const { scheduler, advance } = setup();
  const state$ = new Subject<TrialState>();
  const screen = renderScreen(<Probe state$={state$} scheduler={scheduler} />);
  if (keep) screens.push(screen);
  await waitFor(() => state$.observed, 'the hook subscribing');
  return { scheduler, advance, state$, screen };
}

/** A StatusProbe on a status stream and a state stream of its own, once the hook has subscribed to both; a kept screen is unmounted after the test. */
async function statusProbe({ keep = true, onFrame }: { readonly keep?: boolean; readonly onFrame?: () => void } = {}) {
  const { scheduler, advance } = setup();
  const status$ = new Subject<RunStatus>();
  const state$ = new Subject<TrialState>();
  const screen = renderScreen(<StatusProbe status$={status$} state$={state$} scheduler={scheduler} {...(onFrame === undefined ? {} : { onFrame })} />);
  if (keep) screens.push(screen);
  await waitFor(() => status$.observed && state$.observed, 'the hook subscribing');
  return { scheduler, advance, status$, state$, screen };
}

describe('useFrames', () => {
  it('shows nothing from a source that never emits', async () => {
    const { scheduler, advance } = setup();
    const screen = renderScreen(<Probe state$={new Subject<TrialState>()} scheduler={scheduler} />);
    screens.push(screen);
    await advance(1000);
    expect(screen.lastFrame()).toContain('muscles=0');
  });

  it('shows the one state emitted, one frame later', async () => {
    const { advance, state$, screen } = await probe();
    state$.next(walkingState());
    expect(screen.lastFrame()).toContain('muscles=0');
    await advance(80);
    await shows(screen, 'calf=2.71');
  });

  it('shows the newest of many emissions of the same mutated object', async () => {
    const { advance, state$, screen } = await probe();
    const state = walkingState();
    for (let i = 0; i < 50; i++) {
      pushSample(state, 'calf', { tS: 6 + i / 100, sarcomereUm: 2 + i / 100 });
      state$.next(state);
    }
    await advance(80);
    await shows(screen, 'calf=2.49');
  });

  it('keeps the last state and says why when the source errors', async () => {
    const { advance, state$, screen } = await probe();
    walkThenFail(state$, 'trial file vanished');
    await advance(300);
    await shows(screen, 'calf=2.71');
    await shows(screen, 'error=trial file vanished');
  });

  it('unsubscribes from the source and stops its timers on unmount', async () => {
    const { scheduler, advance, state$, screen } = await probe({ keep: false });
    state$.next(walkingState());
    await advance(40);
    expect(state$.observed).toBe(true);
    expect(scheduler.actions.length).toBeGreaterThan(0);
    screen.instance.unmount();
    await tick(5);
    expect(state$.observed).toBe(false);
    expect(scheduler.actions.filter((a) => !a.closed)).toHaveLength(0);
  });

  it('unsubscribes when unmounted before anything arrived', async () => {
    const { state$, screen } = await probe({ keep: false });
    screen.instance.unmount();
    await tick(5);
    expect(state$.observed).toBe(false);
  });

  it('holds the shown view while frozen and catches up when released', async () => {
    const { scheduler, advance, state$, screen } = await probe();
    const state = walkingState();
    state$.next(state);
    await advance(100);
    screen.instance.rerender(<Probe state$={state$} scheduler={scheduler} frozen />);
    pushSample(state, 'calf', { tS: 7, sarcomereUm: 3.33 });
    state$.next(state);
    await advance(1000);
    expect(screen.lastFrame()).toContain('calf=2.71');
    expect(state$.observed).toBe(true);
    screen.instance.rerender(<Probe state$={state$} scheduler={scheduler} frozen={false} />);
    await waitFor(() => screen.lastFrame().includes('calf=3.33'), 'the newest state once released');
  });
});

describe('useFrames with a status stream', () => {
  it('merges the fields of each emission into the status so far and unsubscribes on unmount', async () => {
    const { advance, status$, screen } = await statusProbe({ keep: false });
    await advance(100);
    expect(screen.lastFrame()).toContain('log=none conn=none');
    status$.next({ logPath: 'sessions/a.log' });
    status$.next({ connection: { state: 'connected' } });
    await advance(100);
    await shows(screen, 'log=sessions/a.log conn=connected');
    status$.next({ connection: undefined });
    await advance(100);
    await shows(screen, 'log=sessions/a.log conn=none');
    screen.instance.unmount();
    await tick(5);
    expect(status$.observed).toBe(false);
  });

  it('keeps the status so far when the status stream fails', async () => {
    const { advance, status$, screen } = await statusProbe();
    await advance(10);
    status$.next({ logPath: 'sessions/b.log', connection: { state: 'listening' } });
    await advance(100);
    status$.error(new Error('status source gone'));
    await advance(100);
    await shows(screen, 'log=sessions/b.log conn=listening');
    expect(status$.observed).toBe(false);
  });

  it('draws the state and the status arriving in one frame interval as one frame', async () => {
    let renders = 0;
    const { scheduler, status$, state$, screen } = await statusProbe({ onFrame: () => renders++ });
    const before = renders;
    const state = walkingState();
    // The status first, the state 40 ms later, both inside one frame interval: drawn once. (The virtual
    // clock moves only as far as the actions it runs, so the emissions are timed from a clock of their own.)
    const startMs = scheduler.frame;
    for (let ms = 0; ms <= 200; ms += 10) {
      if (ms < 40) status$.next({ logPath: `sessions/${ms}.log` });
      else if (ms < 80) {
        pushSample(state, 'calf', { tS: 6 + ms / 1000, sarcomereUm: 2.5 + ms / 1000 });
        state$.next(state);
      }
      scheduler.maxFrames = startMs + ms;
      scheduler.flush();
      await tick(1);
    }
    await tick(5);
    await shows(screen, 'log=sessions/30.log conn=none calf=2.57');
    expect(renders - before).toBe(1);
  });

  it('draws nothing while nothing changes, and one frame per interval while data flows', async () => {
    let renders = 0;
    const { scheduler, advance, status$, state$, screen } = await statusProbe({ onFrame: () => renders++ });
    // The empty view's rate settles within its window; after that, ticks find nothing new to draw.
    for (let i = 0; i < 12; i++) await advance(250);
    let before = renders;
    for (let i = 0; i < 8; i++) await advance(250);
    expect(renders - before).toBe(0);
    status$.next({ logPath: 'sessions/quiet.log' });
    await advance(250);
    await shows(screen, 'log=sessions/quiet.log');
    expect(renders - before).toBe(1);
    const state = walkingState();
    before = renders;
    // The virtual clock moves only as far as the actions it runs, so the batches are timed from a clock of their own.
    const startMs = scheduler.frame;
    for (let ms = 10; ms <= 1000; ms += 10) {
      pushSample(state, 'calf', { tS: 6 + ms / 1000, sarcomereUm: 2.5 });
      state$.next(state);
      scheduler.maxFrames = startMs + ms;
      scheduler.flush();
      await tick(1);
    }
    // Flowing every 10 ms: one frame per 80 ms and no tick frames between them.
    expect(renders - before).toBeGreaterThanOrEqual(11);
    expect(renders - before).toBeLessThanOrEqual(13);
  });
});
