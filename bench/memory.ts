/**
 * Memory over a long replay: the trial is generated and streamed to a file (never built in memory),
 * then replayed by the tool in a fresh process (bench/memory-child.ts) that measures RSS and heap.
 */
import { execFile } from 'node:child_process';
import { writeFile, rm } from 'node:fs/promises';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { calibrationJson } from '../src/sim/gait-generator.ts';
import { writeBenchTrial } from './generate.ts';
import type { MemoryPoint } from './memory-child.ts';

export interface MemoryResult {
  readonly samples: number;
  readonly fileBytes: number;
  readonly ms: number;
  readonly strides: number;
  readonly points: readonly MemoryPoint[];
  readonly rssStartMb: number;
  readonly rssEndMb: number;
  /** RSS at the end minus RSS at the first checkpoint (after warm-up). */
  readonly rssGrowthMb: number;
  readonly peakRssMb: number;
  readonly heapStartMb: number;
  readonly heapEndMb: number;
  /** Heap after a full collection at the end minus at the first checkpoint. */
  readonly heapGrowthMb: number;
}

const run = promisify(execFile);

export async function measureMemory(dir: string, samples: number): Promise<MemoryResult> {
  const trial = await writeBenchTrial(dir, 'csv', { samples });
  const calibrationPath = join(dir, 'memory-calibration.json');
  await writeFile(calibrationPath, JSON.stringify(calibrationJson(trial.spec)));
  const root = join(dirname(fileURLToPath(import.meta.url)), '..');
  try {
    const { stdout } = await run(
      process.execPath,
      ['--expose-gc', join(root, 'bin/run-ts.js'), join(root, 'bench/memory-child.ts'), trial.path, calibrationPath, String(Math.max(1, Math.round(samples / 10)))],
      { maxBuffer: 16 * 1024 * 1024 },
    );
    const r = JSON.parse(stdout.trim().split('\n').pop() ?? '{}') as {
      samples: number;
      strides: number;
      ms: number;
      peakRssMb: number;
      points: MemoryPoint[];
    };
    const first = r.points[1] ?? r.points[0];
    const last = r.points[r.points.length - 1];
    const start = r.points[0];
    if (first === undefined || last === undefined || start === undefined) throw new Error('memory-child gave no measurements');
    return {
      samples: r.samples,
      fileBytes: trial.bytes,
      ms: r.ms,
      strides: r.strides,
      points: r.points,
      rssStartMb: start.rssMb,
      rssEndMb: last.rssMb,
      rssGrowthMb: last.rssMb - first.rssMb,
      peakRssMb: r.peakRssMb,
      heapStartMb: start.heapUsedMb,
      heapEndMb: last.heapUsedMb,
      heapGrowthMb: last.heapUsedMb - first.heapUsedMb,
    };
  } finally {
    await rm(trial.path, { force: true });
  }
}
