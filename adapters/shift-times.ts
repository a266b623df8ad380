/**
 * A recording's clock onto a trial's joint clock: its `time_offset_s` is added to the time of every frame
 * that has one (samples, gait events, markers, lost connections, clock restarts), after the mapping's own
 * conversion and offset. Frames without a time (headers, rejections) pass as they are.
 */
import { identity, map, type OperatorFunction } from 'rxjs';
import { makeSample, type Batch, type Frame } from '../src/trial/records.ts';

function shifted(f: Frame, offsetS: number): Frame {
  switch (f.kind) {
    case 'sample':
      // A sample is made once, by makeSample: the shifted one is the one the trial sees.
      return makeSample(f.tS + offsetS, f.muscle, f.fascicleMm, f.pennationDeg, f.quality, f.line, f.activation);
    case 'event':
    case 'marker':
    case 'disconnection':
    case 'clock_reset':
      return { ...f, tS: f.tS + offsetS };
    default:
      return f;
  }
}

export function shiftTimes(offsetS: number): OperatorFunction<Batch, Batch> {
  if (offsetS === 0) return identity;
  return map((batch) => {
    for (let i = 0; i < batch.length; i++) batch[i] = shifted(batch[i] as Frame, offsetS);
    return batch;
  });
}
