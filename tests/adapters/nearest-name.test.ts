import { describe, expect, it } from 'vitest';
import { didYouMean, nearestName } from '../../adapters/nearest-name.ts';

// Edit distances below are the Levenshtein distances worked by hand (one insertion, deletion or
// substitution per edit; Levenshtein 1966, Soviet Physics Doklady 10:707–710).
describe('nearestName', () => {
  it('finds a name one edit away (a doubled, dropped or swapped-in letter)', () => {
    expect(nearestName('sarcomeres_in_series_sdd', ['sarcomeres_in_series', 'sarcomeres_in_series_sd'])).toBe('sarcomeres_in_series_sd');
    expect(nearestName('--sped', ['--speed', '--summary', '--strides'])).toBe('--speed');
    expect(nearestName('delimter', ['delimiter', 'decimal', 'skip_lines'])).toBe('delimiter');
  });

  it('suggests nothing when no accepted name is near', () => {
    expect(nearestName('colour', ['speed', 'summary'])).toBeNull();
    expect(nearestName('x', [])).toBeNull();
  });

  it('ignores case when it compares, and keeps the accepted spelling', () => {
    expect(nearestName('SPEED', ['speed'])).toBe('speed');
  });

  it('says the suggestion as a clause, or nothing', () => {
    expect(didYouMean('--sped', ['--speed'])).toBe('; did you mean `--speed`?');
    expect(didYouMean('--colour', ['--speed'])).toBe('');
  });
});
