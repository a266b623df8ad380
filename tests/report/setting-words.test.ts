import { describe, expect, it } from 'vitest';
import { findSetting, numberWords, settingPhrases } from '../../src/report/setting-words.ts';

describe('settingPhrases', () => {
  it('reads the unit from the end of each key, as every output names its columns', () => {
    const phrases = settingPhrases({ gap_threshold_s: 0.25, window_ms: 40, offset_mm: 1.5, noise_mm2: 0.25, drift_mm2_per_s: 12.5, speed_mm_s: 30, rate_hz: 100, angle_deg: 12, share_percent: 10, quality_gate: 0.2 });
    expect(phrases.map((p) => `${p.words} ${p.value}`)).toEqual([
      'gap threshold 0.25 s',
      'window 40 ms',
      'offset 1.5 mm',
      'noise 0.25 mm²',
      'drift 12.5 mm²/s',
      'speed 30 mm/s',
      'rate 100 Hz',
      'angle 12°',
      'share 10 %',
      'quality gate 0.2',
    ]);
  });

  it('writes ranges, lists, switches and nested settings in words', () => {
    const phrases = settingPhrases({
      period_range_s: [0.4, 3],
      plausible_sl_um: { min: 1, max: 5 },
      species_list: ['human', 'frog'],
      activation_shift: true,
      between_fibre_sd_um: null,
      smoothing: { measurement_noise_mm2: 0.25, process_noise_mm2_per_s: 12.5 },
    });
    expect(phrases.map((p) => [p.key, `${p.words} ${p.value}`])).toEqual([
      ['period_range_s', 'period range 0.4–3 s'],
      ['plausible_sl_um', 'plausible sarcomere length 1–5 µm'],
      ['species_list', 'species list human, frog'],
      ['activation_shift', 'activation shift on'],
      ['between_fibre_sd_um', 'between fibre SD off'],
      ['smoothing.measurement_noise_mm2', 'smoothing measurement noise 0.25 mm²'],
      ['smoothing.process_noise_mm2_per_s', 'smoothing process noise 12.5 mm²/s'],
    ]);
  });

  it('keeps the value as the settings give it', () => {
    const [p] = settingPhrases({ stride_flag_threshold: 0.1 });
    expect(p?.raw).toBe(0.1);
  });

  it('writes numbers as given, without binary noise or exponents for everyday sizes', () => {
    expect(numberWords(0.1 + 0.2)).toBe('0.3');
    expect(numberWords(12.5)).toBe('12.5');
    expect(numberWords(0.0005)).toBe('0.0005');
    expect(numberWords(20000)).toBe('20000');
    expect(numberWords(0.00001)).toBe('1e-5');
  });
});

describe('findSetting', () => {
  const phrases = settingPhrases({ stride_flag_gap_fraction: 0.1, gap_threshold_s: 0.25, quality_gate: 0.2, smoothing: { window_s: 1 } });

  it('finds a setting by whole words of its key path, leaving out keys with other words', () => {
    expect(findSetting(phrases, ['gap'], ['flag'])?.key).toBe('gap_threshold_s');
    expect(findSetting(phrases, ['flag'])?.key).toBe('stride_flag_gap_fraction');
    expect(findSetting(phrases, ['window'])?.key).toBe('smoothing.window_s');
    // Whole words only: "qual" is no word of "quality_gate".
    expect(findSetting(phrases, ['qual'])).toBeNull();
  });
});
