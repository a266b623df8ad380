/** Small builders for pipeline tests. Values are invented for the tests. */
import { firstValueFrom, from, lastValueFrom, Observable, toArray, type OperatorFunction } from 'rxjs';
import { makeSample, type Batch, type Frame, type GaitEvent, type Header, type Sample, type Side } from '../../src/trial/records.ts';

let nextLine = 1;

export function sample(tS: number, muscle: string, fascicleMm: number, extra: { quality?: number; pennationDeg?: number } = {}): Sample {
  return makeSample(tS, muscle, fascicleMm, extra.pennationDeg ?? Number.NaN, extra.quality ?? 1, nextLine++);
}

export function strike(tS: number, side: Side): GaitEvent {
  return { kind: 'event', tS, event: 'foot_strike', side, line: nextLine++ };
}

export function toeOff(tS: number, side: Side): GaitEvent {
  return { kind: 'event', tS, event: 'toe_off', side, line: nextLine++ };
}

export function header(fields: Partial<Omit<Header, 'kind' | 'line'>> = {}): Header {
  return { kind: 'header', muscles: {}, line: nextLine++, ...fields };
}

/** Runs batches through a stage and returns every output frame, flattened. */
export async function runFrames(stage: OperatorFunction<Batch, Batch>, batches: Batch[]): Promise<Frame[]> {
  const out = await lastValueFrom(from(batches).pipe(stage, toArray()));
  return out.flat();
}

/** Runs batches through a stage and returns the output batches. */
export async function runBatches(stage: OperatorFunction<Batch, Batch>, batches: Batch[]): Promise<Batch[]> {
  return lastValueFrom(from(batches).pipe(stage, toArray()));
}

export { firstValueFrom, Observable };
