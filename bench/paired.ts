/**
 * Two kinds of run taking turns (A, B, A, B, …), read pair by pair as the ratio A / B and as the median
 * of those ratios: the two runs of a pair meet much the same moment of a shared, noisy machine, so their
 * ratio moves less than either time. By wall time and by CPU time (which other programs move less).
 */
import { median } from '../src/model/stats.ts';

/** One run's wall time and CPU time, ms. */
export interface Timing {
  readonly ms: number;
  readonly cpuMs: number;
}

/** Each pair's ratio by wall time, and their median. */
export interface Ratios {
  readonly ratios: readonly number[];
  readonly ratioMedian: number;
}

/** Each pair's ratio by CPU time, and their median. */
export interface CpuRatios {
  readonly cpuRatios: readonly number[];
  readonly cpuRatioMedian: number;
}

/** A list of times named by what ran: `toolMs`. */
type Named<Name extends string> = { readonly [K in Name]: readonly number[] };

/** The runs' wall times named by what ran (`toolMs`, `loopMs`), with each pair's ratio over / under. */
export type PairedWall<Over extends string, Under extends string> = Named<`${Over}Ms`> & Named<`${Under}Ms`> & Ratios;

/** The same by wall and by CPU time (`toolCpuMs`, `loopCpuMs`). */
export type Paired<Over extends string, Under extends string> = PairedWall<Over, Under> & Named<`${Over}CpuMs`> & Named<`${Under}CpuMs`> & CpuRatios;

function named<Name extends string>(name: Name, values: readonly number[]): Named<Name> {
  return { [name]: values } as Named<Name>;
}

function ratiosOf(over: readonly number[], under: readonly number[]): number[] {
  return over.map((x, i) => x / (under[i] as number));
}

/** Alternating runs by wall time: each pair's over / under and their median. */
export function pairedWall<Over extends string, Under extends string>(over: Over, overRuns: readonly Timing[], under: Under, underRuns: readonly Timing[]): PairedWall<Over, Under> {
  const overMs = overRuns.map((r) => r.ms);
  const underMs = underRuns.map((r) => r.ms);
  const ratios = ratiosOf(overMs, underMs);
  return { ...named(`${over}Ms` as const, overMs), ...named(`${under}Ms` as const, underMs), ratios, ratioMedian: median(ratios) };
}

/** Alternating runs by wall and by CPU time, each pair's over / under and their medians. */
export function paired<Over extends string, Under extends string>(over: Over, overRuns: readonly Timing[], under: Under, underRuns: readonly Timing[]): Paired<Over, Under> {
  const cpu = (runs: readonly Timing[]): number[] => runs.map((r) => r.cpuMs);
  const cpuRatios = ratiosOf(cpu(overRuns), cpu(underRuns));
  return {
    ...pairedWall(over, overRuns, under, underRuns),
    ...named(`${over}CpuMs` as const, cpu(overRuns)),
    ...named(`${under}CpuMs` as const, cpu(underRuns)),
    cpuRatios,
    cpuRatioMedian: median(cpuRatios),
  };
}

/**
 * `pairs` turns of `a` then `b`, each run timed; with `swap`, every other turn runs `b` first, so
 * neither always runs on the warmer page cache.
 */
export async function alternate(
  pairs: number,
  a: () => Promise<Timing>,
  b: () => Promise<Timing>,
  options: { readonly swap?: boolean } = {},
): Promise<{ readonly a: Timing[]; readonly b: Timing[] }> {
  const runs = { a: [] as Timing[], b: [] as Timing[] };
  for (let i = 0; i < pairs; i++) {
    if (options.swap === true && i % 2 === 1) {
      runs.b.push(await b());
      runs.a.push(await a());
    } else {
      runs.a.push(await a());
      runs.b.push(await b());
    }
  }
  return runs;
}

/** Runs `work` in this process: its wall time, and the process's CPU time meanwhile (all threads). */
export async function timeHere(work: () => Promise<unknown>): Promise<Timing> {
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  await work();
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  return { ms, cpuMs: (cpu.user + cpu.system) / 1000 };
}

/** Items per second at the median of the runs' times. */
export function perSecond(count: number, ms: readonly number[]): number {
  return count / (median(ms) / 1000);
}

/** "1.42× wall (1.40 1.42 1.45), 1.38× CPU (1.37 1.38 1.40)": the medians, then pair by pair. */
export function ratiosText(r: Ratios & CpuRatios, digits = 2): string {
  const each = (xs: readonly number[]): string => xs.map((x) => x.toFixed(digits)).join(' ');
  return `${r.ratioMedian.toFixed(digits)}× wall (${each(r.ratios)}), ${r.cpuRatioMedian.toFixed(digits)}× CPU (${each(r.cpuRatios)})`;
}
