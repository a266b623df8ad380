/**
 * Run as a child process by frame-memo.test.ts: draws a fixed sequence of dashboard frames (four
 * muscles, 120×40, colour) with Ink into a stand-in terminal and prints a digest of every byte written,
 * with the memo counts. With the argument `memo` it first registers the screen thread's module hooks
 * (src/dashboard/frame-memo-hooks.js), as dashboard-worker-entry.js does. Invented figures.
 *
 * Usage: node bin/run-ts.js tests/dashboard/render-frames-child.tsx [memo] FRAMES
 */
import { createHash } from 'node:crypto';
import { EventEmitter } from 'node:events';
import { register } from 'node:module';

const memo = process.argv.includes('memo');
const frameCount = Number(process.argv.at(-1));
process.env['FORCE_COLOR'] = '1';
delete process.env['CI'];
if (memo) register('../../src/dashboard/frame-memo-hooks.js', import.meta.url);

const { render } = await import('ink');
const { Subject } = await import('rxjs');
const { default: Dashboard } = await import('../../src/dashboard/dashboard.tsx');
const { createTracker, observeTrial } = await import('../../src/dashboard/view-model.ts');
const { frameMemoCounts } = await import('../../src/dashboard/frame-memo.ts');
const { completeStride, makeMuscle, makeTrialState, pushSample, startStride } = await import('./fixtures.ts');
type TrialFrame = import('../../src/dashboard/trial-frames.ts').TrialFrame;

const hash = createHash('sha256');
let writes = 0;
const stdout = Object.assign(new EventEmitter(), {
  isTTY: true,
  columns: 120,
  rows: 40,
  write(chunk: string): boolean {
    writes++;
    hash.update(chunk);
    return true;
  },
});
const stdin = Object.assign(new EventEmitter(), { isTTY: false, setEncoding() {}, resume() {}, pause() {}, ref() {}, unref() {}, read: () => null });

const names = ['calf', 'thigh', 'shin', 'hamstring'];
const state = makeTrialState(names.map((n) => makeMuscle(n)));
for (const n of names) startStride(state, n, { slMinUm: 2.5, slMaxUm: 2.6 });
for (let k = 0; k < 6; k++) for (const n of names) completeStride(state, n, { slMinUm: 2.3, slMaxUm: 3.1, regionFraction: { plateau: 0.6, descending: 0.4 } });
const tracker = createTracker();
const frames$ = new Subject<TrialFrame>();
let rendered = 0;
const instance = render(<Dashboard frames$={frames$} title="memo check" color={true} onQuit={() => {}} />, {
  stdout: stdout as unknown as NodeJS.WriteStream,
  stdin: stdin as unknown as NodeJS.ReadStream,
  exitOnCtrlC: false,
  patchConsole: false,
  maxFps: 1000,
  onRender: () => void rendered++,
});
const turn = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));
/** Each frame is drawn before the next is given, however busy the machine: the same renders every run. */
async function drawn(count: number): Promise<void> {
  const until = Date.now() + 20_000;
  while (rendered < count) {
    if (Date.now() > until) throw new Error(`render ${count} did not happen within 20 s`);
    await turn();
  }
}
await drawn(1);
let tS = 0;
for (let i = 0; i < frameCount; i++) {
  for (let k = 0; k < 20; k++) for (const n of names) pushSample(state, n, { tS: (tS += 0.0005), sarcomereUm: 2.7 + 0.4 * Math.sin(tS * 6) });
  const before = rendered;
  frames$.next({ view: observeTrial(tracker, state, i * 80), status: {} });
  await drawn(before + 1);
}
instance.unmount();
await instance.waitUntilExit();
process.stdout.write(`${JSON.stringify({ digest: hash.digest('hex'), writes, counts: frameMemoCounts })}\n`);
