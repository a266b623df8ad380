import { describe, expect, it } from 'vitest';
import { overlapProblems, sharedSpan, type RecordingSpan } from '../../adapters/clock-overlap.ts';

const span = (file: string, firstS: number, lastS: number, offsetS = 0): RecordingSpan => ({ file, offsetS, firstS, lastS });

describe('sharedSpan', () => {
  it('is the latest first sample to the earliest last one', () => {
    expect(sharedSpan([span('a', 0, 60), span('b', 0.4, 61), span('c', -1, 59.5)])).toEqual({ firstS: 0.4, lastS: 59.5 });
  });

  it('is null when the recordings share no time, or a span is not known', () => {
    expect(sharedSpan([span('a', 0, 60), span('b', 100, 160)])).toBeNull();
    expect(sharedSpan([span('a', 0, 60), span('b', Number.NaN, Number.NaN)])).toBeNull();
  });
});

describe('overlapProblems', () => {
  it('finds nothing wrong with recordings that overlap by a stride or more, or with one recording', () => {
    expect(overlapProblems([span('a', 0, 60), span('b', 58.9, 120)], 1.1, 'events')).toEqual([]);
    expect(overlapProblems([span('a', 0, 60)], 1.1, 'events')).toEqual([]);
  });

  it('names the recording off the first recording\'s clock, with the offset that lines its first sample up', () => {
    const [problem, ...more] = overlapProblems([span('calf.csv', 0.02, 60), span('thigh.csv', 412.37, 472.3, 0)], 1.1, 'from the events');
    expect(more).toEqual([]);
    expect(problem).toContain('thigh.csv spans 412.37–472.3 s on the trial\'s clock and the other recordings 0.02–60 s: they overlap by nothing, less than one stride (1.1 s, from the events)');
    expect(problem).toContain('"time_offset_s": -412.35 in its entry of the description (it gives none;');
  });

  it('adds the correction to the offset a recording gives, and says when the overlap is short of a stride', () => {
    const [problem] = overlapProblems([span('calf.csv', 0, 60), span('thigh.csv', 59.5, 119.5, 100)], 1.1, 'events');
    expect(problem).toContain('they overlap by 0.5 s, less than one stride');
    expect(problem).toContain('"time_offset_s": 40.5 in its entry of the description (it gives 100;');
  });

  it('among three, names only the one off the others\' clock, lined up with the first that is on it', () => {
    const problems = overlapProblems([span('a.csv', 1000, 1060), span('b.csv', 0, 60), span('c.csv', 0.3, 59)], 1.1, 'events');
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^a\.csv spans 1000–1060 s .*"time_offset_s": -1000 /);
  });
});
