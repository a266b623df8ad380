import { describe, expect, it } from 'vitest';
import { OutBatch } from '../../src/pipeline/out-batch.ts';
import type { Frame, Notice } from '../../src/trial/records.ts';
import { sample } from '../helpers/frames.ts';

const note = (text: string): Notice => ({ kind: 'notice', muscle: null, text });

describe('OutBatch', () => {
  it('passes the input batch itself on when nothing is inserted', () => {
    const input = [sample(0, 'calf', 50), sample(0.01, 'calf', 51)];
    const out = new OutBatch(input);
    for (const f of input) out.pass(f);
    expect(out.done()).toBe(input);
  });

  it('puts each inserted frame after the input frames passed so far, before those still to come', () => {
    const [a, b, c] = [sample(0, 'calf', 50), sample(0.01, 'calf', 51), sample(0.02, 'calf', 52)];
    const input: Frame[] = [a, b, c];
    const out = new OutBatch(input);
    out.insert(note('first'));
    out.pass(a);
    out.pass(b);
    out.insert(note('after b'));
    out.insert(note('after b, second'));
    out.pass(c);
    expect(out.done()).toEqual([note('first'), a, b, note('after b'), note('after b, second'), c]);
    expect(input).toEqual([a, b, c]);
  });
});
