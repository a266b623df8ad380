/**
 * Memory over a long replay: the trial is generated and streamed to a file (never built in memory),
 * then replayed by the tool in a fresh process (bench/memory-child.ts) that measures RSS and heap.
 */
import { writeFile, rm } from 'node:fs/promises';
import { join } from 'node:path';
import { calibrationJson } from '../src/sim/gait-generator.ts';
import { writeBenchTrial } from './generate.ts';
import { benchScript } from './fresh-process.ts';
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

export async function measureMemory(dir: string, samples: number): Promise<MemoryResult> {
  const trial = await writeBenchTrial(dir, 'csv', { samples });
  const calibrationPath = join(dir, 'memory-calibration.json');
  await writeFile(calibrationPath, JSON.stringify(calibrationJson(trial.spec)));
  try {
    const args = [trial.path, calibrationPath, String(Math.max(1, Math.round(samples / 10)))];
    const { result: r } = await benchScript<{ samples: number; strides: number; ms: number; peakRssMb: number; points: MemoryPoint[] }>('memory-child.ts', args, ['--expose-gc']);
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
