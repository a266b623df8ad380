import type { OperatorFunction } from 'rxjs';
import type { Batch, Side } from '../trial/records.ts';
import { OutBatch } from './out-batch.ts';
import { statefulStage } from './stateful-stage.ts';

interface MuscleStrides {
  side: Side | null;
  /** Index of the stride in progress; -1 before the first foot strike of the muscle's side. */
  index: number;
}

export interface SegmentStridesOptions {
  /** Sides given outside the stream (a mapping, --side): they win over the stream header's, and no side is guessed for them. */
  readonly sides?: Readonly<Record<string, Side>>;
}

/**
 * Cuts each muscle's samples into strides from one foot strike of its side to the next: stamps
 * `strideIndex` on samples and says each boundary as a StrideBoundary frame. A muscle with no side
 * given (options.sides) or declared in the header takes the side of the first foot strike seen, and a
 * Notice says so.
 */
export function segmentStrides(options: SegmentStridesOptions = {}): OperatorFunction<Batch, Batch> {
  const fixed = new Map<string, Side>(Object.entries(options.sides ?? {}));
  return statefulStage(() => {
    const muscles = new Map<string, MuscleStrides>();
    const declared = new Map<string, Side>(fixed);
    let firstStrikeSide: Side | null = null;

    const muscleOf = (name: string, out: OutBatch): MuscleStrides => {
      let m = muscles.get(name);
      if (m === undefined) {
        m = { side: declared.get(name) ?? null, index: -1 };
        muscles.set(name, m);
        if (m.side === null && firstStrikeSide !== null) assume(name, m, firstStrikeSide, out);
      }
      return m;
    };

    const assume = (name: string, m: MuscleStrides, side: Side, out: OutBatch): void => {
      m.side = side;
      out.insert({
        kind: 'notice',
        muscle: name,
        text: `${name}: no side declared in the header, so it takes the side of the first foot strike seen (${side}); give it with --side ${name}=left|right (or "muscles": {"${name}": {"side": …}} in a mapping or the stream header) to be sure`,
      });
    };

    return (batch) => {
      const out = new OutBatch(batch);
      for (const f of batch) {
        if (f.kind === 'sample') {
          // A new muscle may need a Notice, ahead of its first sample.
          f.strideIndex = (muscles.get(f.muscle) ?? muscleOf(f.muscle, out)).index;
          out.pass(f);
          continue;
        }
        out.pass(f);
        if (f.kind === 'header') {
          // Declared muscles count strides from the first foot strike, even before their first sample.
          for (const [name, decl] of Object.entries(f.muscles)) {
            if (fixed.has(name)) continue;
            if (decl.side !== undefined) declared.set(name, decl.side);
            const m = muscles.get(name);
            if (m === undefined) muscleOf(name, out);
            else if (m.side === null && decl.side !== undefined) m.side = decl.side;
          }
        } else if (f.kind === 'event' && f.event === 'foot_strike') {
          if (firstStrikeSide === null) {
            firstStrikeSide = f.side;
            for (const [name, m] of muscles) if (m.side === null) assume(name, m, f.side, out);
          }
          for (const [name, m] of muscles) {
            if (m.side !== f.side) continue;
            m.index++;
            out.insert({ kind: 'stride', muscle: name, side: f.side, index: m.index, tS: f.tS });
          }
        }
      }
      return out.done();
    };
  });
}
