/**
 * Memory over one long replay, in a fresh process started with --expose-gc: RSS and heap (after a full
 * collection) at every checkpoint of accepted samples, printed as one JSON line on standard output.
 * Usage: node --expose-gc bin/run-ts.js bench/memory-child.ts FILE CALIBRATION.json CHECKPOINT_SAMPLES
 */
import { readFileSync } from 'node:fs';
import { fileSource } from '../adapters/file-source.ts';
import { parseCalibration } from '../adapters/calibration-file.ts';
import { runTrial } from '../src/run/run-trial.ts';
import { summaryJson } from '../src/output/summary-json.ts';

export interface MemoryPoint {
  readonly samples: number;
  readonly rssMb: number;
  readonly heapUsedMb: number;
  readonly externalMb: number;
}

const [path, calibrationPath, every] = process.argv.slice(2);
if (path === undefined || calibrationPath === undefined) {
  console.error('memory-child: give FILE CALIBRATION.json [CHECKPOINT_SAMPLES]');
  process.exit(2);
}
const gc = (globalThis as { gc?: () => void }).gc;
if (gc === undefined) {
  console.error('memory-child: run with node --expose-gc');
  process.exit(2);
}
const parsed = parseCalibration(JSON.parse(readFileSync(calibrationPath, 'utf8')));
if (!parsed.ok) {
  console.error(`memory-child: ${parsed.problems.join('; ')}`);
  process.exit(2);
}
const step = Number(every ?? 1_000_000);
const MB = 1024 * 1024;
const points: MemoryPoint[] = [];
const measure = (samples: number): void => {
  gc();
  const u = process.memoryUsage();
  points.push({ samples, rssMb: u.rss / MB, heapUsedMb: u.heapUsed / MB, externalMb: (u.external + u.arrayBuffers) / MB });
};
measure(0);
let next = step;
const t0 = performance.now();
const run = runTrial(fileSource(path), { source: path, calibration: parsed.spec });
run.state$.subscribe((state) => {
  if (state.frames.accepted >= next) {
    measure(state.frames.accepted);
    next += step;
  }
});
const state = await run.done;
const ms = performance.now() - t0;
measure(state.frames.accepted);
let strides = 0;
for (const m of state.muscles.values()) strides += m.strides.length;
const summary = summaryJson(state);
let peakRssMb = 0;
for (const p of points) peakRssMb = Math.max(peakRssMb, p.rssMb);
console.log(JSON.stringify({ samples: state.frames.accepted, strides, ms, peakRssMb, points, summaryMuscles: Object.keys(summary.muscles) }));
