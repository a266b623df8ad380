import { describe, expect, it } from 'vitest';
import { StrideList } from '../../src/trial/stride-list.ts';
import { zeroRegionRecord } from '../../src/model/regions.ts';
import type { SegmentFigures, StrideSummary } from '../../src/trial/state.ts';

function segment(startS: number, endS: number, slMeanUm: number): SegmentFigures {
  return {
    startS,
    endS,
    // Figures of at most 7 significant digits come back exactly.
    slMinUm: Number((slMeanUm - 0.3).toFixed(4)),
    slMaxUm: Number((slMeanUm + 0.3).toFixed(4)),
    slMeanUm,
    slP5Um: Number((slMeanUm - 0.25).toFixed(4)),
    slP95Um: Number((slMeanUm + 0.25).toFixed(4)),
    excursionUm: 0.6,
    regionFraction: { ...zeroRegionRecord(), plateau: 0.1, descending: 0.9 },
    regionProbability: null,
    forceMean: 0.93,
    forceLvMean: 0.8,
    forceTendonMean: 0.75,
    velocityMinMmS: -120.5,
    velocityMaxMmS: 98.25,
    gapS: 0.01,
    sampleCount: 109,
  };
}

function stride(index: number): StrideSummary {
  const t = 40000 + index * 1.1;
  return {
    index,
    ...segment(t, t + 1.1, 2.7),
    flagged: index % 3 === 0,
    segmentation: 'events',
    stance: segment(t, t + 0.66, 2.6),
    swing: index % 2 === 0 ? segment(t + 0.66, t + 1.1, 2.9) : null,
  };
}

describe('StrideList', () => {
  it('gives back what was pushed: times and fractions exactly, other figures to 7 significant digits', () => {
    const odd = new StrideList();
    odd.push({ ...stride(0), slMeanUm: 2.605492138309 });
    expect(odd.at(0)?.slMeanUm).toBe(2.605492);
    const list = new StrideList();
    for (let i = 0; i < 2500; i++) list.push(stride(i));
    expect(list.length).toBe(2500);
    for (const i of [0, 1, 1023, 1024, 2499]) expect(list.at(i)).toEqual(stride(i));
  });

  it('answers at(), slice() and iteration like an array', () => {
    const list = new StrideList();
    const array: StrideSummary[] = [];
    for (let i = 0; i < 10; i++) {
      list.push(stride(i));
      array.push(stride(i));
    }
    expect(list.at(-1)).toEqual(array.at(-1));
    expect(list.at(10)).toBeUndefined();
    expect(list.at(1.5)).toBeUndefined();
    expect(list.slice(-3)).toEqual(array.slice(-3));
    expect(list.slice(2, 4)).toEqual(array.slice(2, 4));
    expect(list.slice(8, 100)).toEqual(array.slice(8, 100));
    expect([...list]).toEqual(array);
  });

  it('keeps region probabilities only for the strides that have them', () => {
    const list = new StrideList();
    const rp = { expected: { ...zeroRegionRecord(), plateau: 1 }, low: { ...zeroRegionRecord(), plateau: 0.9 }, high: { ...zeroRegionRecord(), plateau: 1 } };
    list.push({ ...stride(0), regionProbability: rp });
    list.push(stride(1));
    expect(list.at(0)?.regionProbability).toEqual(rp);
    expect(list.at(1)?.regionProbability).toBeNull();
  });
});
