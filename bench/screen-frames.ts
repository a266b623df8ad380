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
 * Usage: node bin/run-ts.js bench/screen-frames.ts [--frames 200] [--passes 5] [--columns 120] [--rows 40] [--muscles 4] [--no-color]
 * Prints a table, then one line of JSON.
 */
import { createHash } from 'node:crypto';
import { EventEmitter } from 'node:events';

const argv = process.argv.slice(2);
const value = (name: string, fallback: number): number => {
  const i = argv.indexOf(name);
  const given = i >= 0 ? Number(argv[i + 1]) : fallback;
  if (!Number.isInteger(given) || given <= 0) {
    console.error(`screen-frames: ${name} takes a whole number above 0 (got ${argv[i + 1]})`);
    process.exit(2);
  }
  return given;
};
const frameCount = value('--frames', 200);
const passes = value('--passes', 5);
const columns = value('--columns', 120);
const rows = value('--rows', 40);
const muscleCount = value('--muscles', 4);
const color = !argv.includes('--no-color');

// Chalk reads FORCE_COLOR when it loads: as the screen's thread is told a 256-colour terminal's depth.
process.env['FORCE_COLOR'] = color ? '2' : '0';
delete process.env['CI'];

const { render } = await import('ink');
const { createElement } = await import('react');
const { Subject } = await import('rxjs');
const { default: Dashboard } = await import('../src/dashboard/components/dashboard.tsx');
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

class Screen extends EventEmitter {
  readonly isTTY = true;
  readonly columns = columns;
  readonly rows = rows;
  hash = createHash('sha256');
  bytes = 0;
  write = (chunk: string): boolean => {
    this.bytes += chunk.length;
    this.hash.update(chunk);
    return true;
  };
}

class Keys extends EventEmitter {
  readonly isTTY = true;
  read = (): null => null;
  setEncoding(): void {}
  setRawMode(): void {}
  resume(): void {}
  pause(): void {}
  ref(): void {}
  unref(): void {}
}

const frames = makeFrames();
const screen = new Screen();
const frames$ = new Subject<TrialFrame>();
let rendered = 0;
const instance = render(createElement(Dashboard, { frames$, title: 'screen bench', color, onQuit: () => undefined, columns, rows }), {
  stdout: screen as unknown as NodeJS.WriteStream,
  stdin: new Keys() as unknown as NodeJS.ReadStream,
  exitOnCtrlC: false,
  patchConsole: false,
  // Each frame is drawn before the next is given, so no frame waits for the throttle's next turn.
  maxFps: 1000,
  onRender: () => void rendered++,
});
const turn = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));
async function drawn(count: number): Promise<void> {
  const until = Date.now() + 60_000;
  while (rendered < count) {
    if (Date.now() > until) throw new Error(`screen-frames: render ${count} did not happen within 60 s`);
    await turn();
  }
}
await drawn(1);

/** Draws every frame once; the CPU and wall time it took, ms. */
async function pass(): Promise<{ cpuMs: number; wallMs: number }> {
  const cpu0 = process.cpuUsage();
  const wall0 = performance.now();
  for (const frame of frames) {
    const before = rendered;
    frames$.next(frame);
    await drawn(before + 1);
  }
  const cpu = process.cpuUsage(cpu0);
  return { cpuMs: (cpu.user + cpu.system) / 1000, wallMs: performance.now() - wall0 };
}

await pass();
const timed: { cpuMs: number; wallMs: number }[] = [];
for (let p = 0; p < passes; p++) timed.push(await pass());
instance.unmount();
await instance.waitUntilExit();

const perFrame = timed.map((t) => t.cpuMs / frames.length).sort((a, b) => a - b);
const median = perFrame[Math.floor(perFrame.length / 2)] ?? Number.NaN;
const result = {
  columns,
  rows,
  muscles: muscleCount,
  color,
  frames: frames.length,
  passes,
  cpuMsPerFrame: perFrame,
  cpuMsPerFrameMedian: median,
  wallMsPerFrameMedian: timed.map((t) => t.wallMs / frames.length).sort((a, b) => a - b)[Math.floor(timed.length / 2)],
  bytesPerFrame: screen.bytes / (frames.length * (passes + 1)),
  digest: screen.hash.digest('hex'),
};
console.log(
  `screen ${columns}×${rows}, ${muscleCount} muscles, ${color ? 'colour' : 'no colour'}: ${median.toFixed(2)} ms CPU per frame (median of ${passes} passes of ${frames.length} frames: ${perFrame.map((x) => x.toFixed(2)).join(' ')}), ${result.bytesPerFrame.toFixed(0)} characters written per frame`,
);
console.log(JSON.stringify(result));
