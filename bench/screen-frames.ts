/**
 * CPU per frame of the dashboard, drawn by Ink as the screen's thread draws it: 120×40, four muscles,
 * colour (a 256-colour terminal), React's production build. The frames are made first, from the repo's
 * generator (an invented walk, 4 muscles × 500 Hz, one message per 10 ms) run through the pipeline,
 * one every 110 ms of device time (about 9 frames/s, as in the live bench); each is copied as a message
 * to another thread copies it and shared with the one before (shareFrame), as the screen's thread does.
 * Then they are drawn one after another into a stand-in terminal, each drawn before the next is given;
 * the first pass warms up, the passes after it are timed (process CPU per frame; nothing else runs in
 * this process meanwhile). It also prints a digest of every byte written, so two versions of the
 * dashboard can be checked to write the same screens.
 *
 * With --against DIR (another checkout of lengthwise, e.g. an earlier commit unpacked with its
 * node_modules linked to these), that checkout's dashboard draws the same frames in the same process,
 * its passes alternating with this one's (this, that, that, this, …): before and after in one run, on
 * the same machine at the same moment. The frames are made by this checkout's pipeline.
 *
 * Usage: node bin/run-ts.js bench/screen-frames.ts [--frames 200] [--passes 5] [--columns 120] [--rows 40] [--muscles 4] [--no-color] [--against DIR]
 * Prints a table, then one line of JSON.
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { register } from 'tsx/esm/api';
import { FakeStdin, FakeStdout } from './fake-terminal.ts';
import { benchArgs, wholeNumber } from './args.ts';

const options = benchArgs('screen-frames', process.argv.slice(2), {
  frames: { type: 'string' },
  passes: { type: 'string' },
  columns: { type: 'string' },
  rows: { type: 'string' },
  muscles: { type: 'string' },
  'no-color': { type: 'boolean' },
  against: { type: 'string' },
});
const count = (name: 'frames' | 'passes' | 'columns' | 'rows' | 'muscles', fallback: number): number => wholeNumber('screen-frames', name, options[name], fallback);
const frameCount = count('frames', 200);
const passes = count('passes', 5);
const columns = count('columns', 120);
const rows = count('rows', 40);
const muscleCount = count('muscles', 4);
const color = options['no-color'] !== true;
const against = options.against;
if (against !== undefined && !existsSync(join(against, 'src/dashboard/components/dashboard.tsx'))) {
  console.error(`screen-frames: --against takes a checkout of lengthwise (a folder with src/dashboard/components/dashboard.tsx); got ${against}`);
  process.exit(2);
}

// Chalk reads FORCE_COLOR when it loads: as the screen's thread is told a 256-colour terminal's depth.
process.env['FORCE_COLOR'] = color ? '2' : '0';
delete process.env['CI'];

const { render } = await import('ink');
const { createElement } = await import('react');
const { Subject } = await import('rxjs');
const { default: Dashboard } = await import('../src/dashboard/components/dashboard.tsx');
type DashboardComponent = typeof Dashboard;
const { createTracker, observeTrial } = await import('../src/dashboard/view/view-model.ts');
const { shareFrame } = await import('../src/dashboard/view/share-frame.ts');
const { runTrial } = await import('../src/run/run-trial.ts');
const { decodeMessage } = await import('../adapters/device-mapping.ts');
const { createFeed } = await import('../src/sim/feed.ts');
const { scenarioSpec } = await import('../src/sim/scenarios.ts');
type TrialFrame = import('../src/dashboard/view/trial-frames.ts').TrialFrame;
type Batch = import('../src/trial/records.ts').Batch;

const FRAME_MS = 110;
const MESSAGE_MS = 10;

/** The frames the screen's thread would get from a live walk: plain data, copied, shared with the one before. */
function makeFrames(): TrialFrame[] {
  const names = ['calf', 'thigh', 'shin', 'hamstring', 'glute', 'foot'].slice(0, muscleCount);
  const durationS = (frameCount * FRAME_MS) / 1000 + 2;
  const feed = createFeed(scenarioSpec('walk', { seed: 7, rateHz: 500, durationS: durationS + 1, muscles: names, header: { subject: 'SYN-SCREEN', trial: 'bench-screen', calibrate: 'all' } }));
  const input = new Subject<Batch>();
  const run = runTrial(input, { source: 'bench-screen' });
  let line = 1;
  const send = (records: readonly object[]): void => {
    const frames = decodeMessage(JSON.stringify(records), line);
    line += frames.length;
    input.next(frames);
  };
  if (feed.header !== null) send([feed.header]);
  const tracker = createTracker();
  const out: TrialFrame[] = [];
  let shown: TrialFrame | null = null;
  // Two seconds in first, so the panels have strides to show.
  for (let tMs = MESSAGE_MS; out.length < frameCount; tMs += MESSAGE_MS) {
    const batch = feed.pull(tMs / 1000);
    if (batch.length > 0) send(batch);
    if (tMs >= 2000 && tMs % FRAME_MS === 0) {
      const frame: TrialFrame = { view: observeTrial(tracker, run.latest(), tMs), status: {} };
      shown = shareFrame(shown, structuredClone(frame));
      out.push(shown);
    }
  }
  run.stop();
  return out;
}

/** The stand-in terminal of the live bench, with a digest of every byte written. */
class Screen extends FakeStdout {
  readonly hash = createHash('sha256');
  constructor() {
    super();
    this.columns = columns;
    this.rows = rows;
    const count = this.write;
    this.write = (chunk: string | Uint8Array): boolean => {
      this.hash.update(chunk);
      return count(chunk);
    };
  }
}

const frames = makeFrames();
const turn = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

interface Pass {
  readonly cpuMs: number;
  readonly wallMs: number;
}

/** One dashboard drawing into its own stand-in terminal. */
async function mount(component: DashboardComponent, draw = render): Promise<{ pass(): Promise<Pass>; close(): Promise<{ digest: string; bytes: number }> }> {
  const screen = new Screen();
  const frames$ = new Subject<TrialFrame>();
  const instance = draw(createElement(component, { frames$, title: 'screen bench', color, onQuit: () => undefined, columns, rows }), {
    stdout: screen as unknown as NodeJS.WriteStream,
    stdin: new FakeStdin() as unknown as NodeJS.ReadStream,
    exitOnCtrlC: false,
    patchConsole: false,
    // Each frame is written before the next is given, so no frame waits for the throttle's next turn.
    maxFps: 1000,
  });
  // Every frame of the run shows a new time, so each is written: waiting for the write (not only the
  // render) keeps Ink from folding two frames into one, and the bytes the same from run to run.
  const written = async (count: number): Promise<void> => {
    const until = Date.now() + 60_000;
    while (screen.frames < count) {
      if (Date.now() > until) throw new Error(`screen-frames: screen ${count} was not written within 60 s`);
      await turn();
    }
  };
  // Frames are given once the dashboard listens, and after the renders of its start (a resize check).
  await written(1);
  while (!frames$.observed) await turn();
  await new Promise((resolve) => setTimeout(resolve, 100));
  return {
    /** Draws every frame once; the CPU and wall time it took, ms. */
    async pass() {
      const cpu0 = process.cpuUsage();
      const wall0 = performance.now();
      for (const frame of frames) {
        const before = screen.frames;
        frames$.next(frame);
        await written(before + 1);
      }
      const cpu = process.cpuUsage(cpu0);
      return { cpuMs: (cpu.user + cpu.system) / 1000, wallMs: performance.now() - wall0 };
    },
    async close() {
      instance.unmount();
      await instance.waitUntilExit();
      return { digest: screen.hash.digest('hex'), bytes: screen.bytes };
    },
  };
}

const median = (xs: readonly number[]): number => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? Number.NaN;

const screens = [{ name: 'this checkout', screen: await mount(Dashboard) }];
if (against !== undefined) {
  // Compiled with that checkout's own settings (its files lie outside this one's tsconfig), in a
  // namespace of its own: that dashboard is drawn with the Ink it imports, as it would be at home.
  const there = register({ namespace: 'screen-frames-against', tsconfig: resolve(against, 'tsconfig.json') });
  const dashboardUrl = pathToFileURL(resolve(against, 'src/dashboard/components/dashboard.tsx')).href;
  const other = (await there.import(dashboardUrl, import.meta.url)) as { default: DashboardComponent };
  const otherInk = (await there.import('ink', dashboardUrl)) as { render: typeof render };
  screens.push({ name: resolve(against), screen: await mount(other.default, otherInk.render) });
}
// A first pass of each warms up; then the order alternates, so neither always runs first.
for (const s of screens) await s.screen.pass();
const timed: Pass[][] = screens.map(() => []);
for (let p = 0; p < passes; p++) {
  const order = p % 2 === 0 ? screens.map((_, i) => i) : screens.map((_, i) => screens.length - 1 - i);
  for (const i of order) timed[i]?.push(await (screens[i] as (typeof screens)[number]).screen.pass());
}
const results = [];
for (const [i, s] of screens.entries()) {
  const written = await s.screen.close();
  const perFrame = (timed[i] ?? []).map((t) => t.cpuMs / frames.length);
  results.push({
    checkout: s.name,
    cpuMsPerFrame: perFrame,
    cpuMsPerFrameMedian: median(perFrame),
    wallMsPerFrameMedian: median((timed[i] ?? []).map((t) => t.wallMs / frames.length)),
    bytesPerFrame: written.bytes / (frames.length * (passes + 1)),
    digest: written.digest,
  });
}
const [mine, theirs] = results;
const ratios = theirs === undefined ? [] : (mine?.cpuMsPerFrame ?? []).map((x, p) => x / (theirs.cpuMsPerFrame[p] ?? Number.NaN));
const result = {
  columns,
  rows,
  muscles: muscleCount,
  color,
  frames: frames.length,
  passes,
  ...mine,
  ...(theirs === undefined ? {} : { against: theirs, ratioMedian: median(ratios), ratios, sameBytes: theirs.digest === mine?.digest }),
};
const size = `${columns}×${rows}, ${muscleCount} muscles, ${color ? 'colour' : 'no colour'}`;
for (const r of results) {
  console.log(
    `screen ${size}: ${r.cpuMsPerFrameMedian.toFixed(2)} ms CPU per frame (median of ${passes} passes of ${frames.length} frames: ${r.cpuMsPerFrame.map((x) => x.toFixed(2)).join(' ')}), ` +
      `${r.bytesPerFrame.toFixed(0)} characters written per frame — ${r.checkout}`,
  );
}
if (theirs !== undefined) {
  console.log(
    `screen this checkout / the other: ${median(ratios).toFixed(2)}× CPU per frame (pass by pass ${ratios.map((x) => x.toFixed(2)).join(' ')}); ` +
      `${theirs.digest === mine?.digest ? 'the same bytes written' : 'DIFFERENT bytes written'}`,
  );
}
console.log(JSON.stringify(result));
