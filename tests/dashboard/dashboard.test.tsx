import './force-color.ts';
import { afterEach, describe, expect, it } from 'vitest';
import { BehaviorSubject, Subject, VirtualTimeScheduler } from 'rxjs';
import Dashboard, { type Props } from '../../src/dashboard/dashboard.tsx';
import type { TrialState } from '../../src/state.ts';
import type { DashboardStatus } from '../../src/dashboard/status.ts';
import { pushSample, walkingState } from './fixtures.ts';
import { COLOUR_SGR, frameWhere, plain, renderScreen, tick, type Screen } from './terminal-double.ts';

const screens: Screen[] = [];
afterEach(() => {
  for (const s of screens.splice(0)) s.instance.unmount();
});

/** Renders the dashboard on a virtual clock; `advance(ms)` moves the clock and runs what is due. */
function show(state$: Props['state$'], more: Partial<Props> = {}, columns = 80, rows = 24) {
  const scheduler = new VirtualTimeScheduler(undefined, 0);
  const advance = async (ms: number): Promise<void> => {
    scheduler.maxFrames = scheduler.frame + ms;
    scheduler.flush();
    await tick(5);
  };
  const screen = renderScreen(
    <Dashboard state$={state$} title="lengthwise" onQuit={() => undefined} scheduler={scheduler} {...more} />,
    columns,
    rows,
  );
  screens.push(screen);
  return { screen, scheduler, advance };
}

describe('Dashboard', () => {
  it('waits for the first samples on an empty trial', async () => {
    const { screen, advance } = show(new Subject<TrialState>());
    await advance(300);
    expect(plain(screen.lastFrame())).toContain('waiting for the first samples');
  });

  it('shows each muscle with its numbers and units', async () => {
    const { screen, advance } = show(new BehaviorSubject(walkingState()));
    await advance(300);
    const text = plain(screen.lastFrame());
    expect(text).toContain('calf');
    expect(text).toContain('thigh');
    expect(text).toContain('SL 2.71 µm');
    expect(text).toContain('PLATEAU');
    expect(text).toContain('DESCENDING');
    expect(text).toContain('mm/s');
    expect(text).toContain('°');
  });

  it('fits an 80×24 terminal with a row to spare', async () => {
    const { screen, advance } = show(new BehaviorSubject(walkingState()), { status$: new BehaviorSubject<DashboardStatus>({ replay: { progress: 0.3, speed: 2 } }) });
    await advance(300);
    const lines = plain(screen.lastFrame()).split('\n');
    expect(lines.length).toBeLessThanOrEqual(23);
    for (const line of lines) expect([...line].length).toBeLessThanOrEqual(80);
  });

  it('uses colour by default and none at all when colour is off', async () => {
    const coloured = show(new BehaviorSubject(walkingState()));
    await coloured.advance(300);
    expect(coloured.screen.lastFrame()).toMatch(COLOUR_SGR);
    const bare = show(new BehaviorSubject(walkingState()), { color: false });
    await bare.advance(300);
    expect(bare.screen.lastFrame()).not.toMatch(COLOUR_SGR);
    expect(plain(bare.screen.lastFrame())).toContain('SL 2.71 µm');
  });

  it('follows a state mutated in place at a bounded frame rate', async () => {
    const state = walkingState();
    const state$ = new Subject<TrialState>();
    const { screen, advance } = show(state$, { frameMs: 80 });
    state$.next(state);
    await advance(100);
    expect(plain(screen.lastFrame())).toContain('SL 2.71 µm');
    const framesBefore = screen.out.frames.length;
    for (let i = 1; i <= 20; i++) {
      pushSample(state, 'calf', { tS: 5 + i / 100, sarcomereUm: 2.71 + i / 100 });
      state$.next(state);
    }
    await advance(100);
    expect(plain(screen.lastFrame())).toContain('SL 2.91 µm');
    expect(screen.out.frames.length - framesBefore).toBeLessThanOrEqual(3);
  });

  it('follows a resize, side by side when wide and stacked when narrow', async () => {
    const { screen, advance } = show(new BehaviorSubject(walkingState()), {}, 100, 40);
    await advance(300);
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
});
