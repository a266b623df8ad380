/**
 * Settings in words for a methods section: a key of the settings file read as its name and unit (the unit
 * is the end of the key, as in every output's columns: `_s`, `_um`, `_mm2`, …), its value written with that
 * unit, and the few settings the methods' sentences quote found by the words of their keys.
 */
import type { SettingValue } from './study-report-input.ts';

/** Key endings → the unit written after the value, longest first. */
const UNIT_SUFFIXES: readonly (readonly [suffix: string, unit: string])[] = [
  ['_mm2_per_s', ' mm²/s'],
  ['_mm_s', ' mm/s'],
  ['_mm2', ' mm²'],
  ['_um', ' µm'],
  ['_mm', ' mm'],
  ['_ms', ' ms'],
  ['_hz', ' Hz'],
  ['_deg', '°'],
  ['_percent', ' %'],
  ['_s', ' s'],
];

/** Short forms in keys, said in full (or as a paper writes them). */
const KEY_WORDS: Readonly<Record<string, string>> = { sl: 'sarcomere length', sd: 'SD', cv: 'CV', ci95: '95 % CI' };

/** A key path in words: its parts split at dots and underscores, short forms said in full. */
function inWords(path: string): string {
  return path
    .split(/[._]/)
    .filter((w) => w !== '')
    .map((w) => KEY_WORDS[w] ?? w)
    .join(' ');
}

/** A flattened setting: its key path ("smoothing.process_noise_mm2_per_s"), its name in words, its value with the unit. */
export interface SettingPhrase {
  readonly key: string;
  readonly words: string;
  readonly value: string;
  /** The value as the settings give it. */
  readonly raw: SettingValue;
}

function unitOf(key: string): { readonly stem: string; readonly unit: string } {
  for (const [suffix, unit] of UNIT_SUFFIXES) if (key.endsWith(suffix) && key.length > suffix.length) return { stem: key.slice(0, -suffix.length), unit };
  return { stem: key, unit: '' };
}

/** A number as written in the methods: as given, never in exponent form for everyday sizes. */
export function numberWords(x: number): string {
  return Number.isInteger(x) || Math.abs(x) >= 1e-4 ? String(Number(x.toPrecision(12))) : x.toExponential();
}

function valueWords(value: SettingValue, unit: string): string {
  if (typeof value === 'number') return `${numberWords(value)}${unit}`;
  if (typeof value === 'boolean') return value ? 'on' : 'off';
  if (value === null) return 'off';
  if (typeof value === 'string') return value;
  if (Array.isArray(value)) {
    const items = value as readonly SettingValue[];
    if (items.length === 2 && items.every((v) => typeof v === 'number')) return `${numberWords(items[0] as number)}–${numberWords(items[1] as number)}${unit}`;
    return items.map((v) => valueWords(v, unit)).join(', ');
  }
  return Object.entries(value)
    .map(([k, v]) => {
      const { stem, unit: inner } = unitOf(k);
      return `${inWords(stem)} ${valueWords(v, inner)}`;
    })
    .join(', ');
}

/**
 * Every setting as a phrase, in the settings' order: nested objects (except `{min, max}` pairs) become
 * keys of their own under their parent's name ("smoothing measurement noise 0.25 mm²").
 */
export function settingPhrases(settings: Readonly<Record<string, SettingValue>>, prefix = ''): SettingPhrase[] {
  const phrases: SettingPhrase[] = [];
  for (const [key, value] of Object.entries(settings)) {
    const path = prefix === '' ? key : `${prefix}.${key}`;
    if (typeof value === 'object' && value !== null && !Array.isArray(value) && !isRange(value)) {
      phrases.push(...settingPhrases(value as Readonly<Record<string, SettingValue>>, path));
      continue;
    }
    const { stem, unit } = unitOf(key);
    const words = inWords(path.replace(/[^.]*$/, stem));
    phrases.push({ key: path, words, value: isRange(value) ? `${numberWords(value.min)}–${numberWords(value.max)}${unit}` : valueWords(value, unit), raw: value });
  }
  return phrases;
}

function isRange(value: SettingValue): value is { readonly min: number; readonly max: number } {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return false;
  const keys = Object.keys(value);
  const record = value as Readonly<Record<string, SettingValue>>;
  return keys.length === 2 && typeof record['min'] === 'number' && typeof record['max'] === 'number';
}

/**
 * The first setting whose key path holds every one of `words` (as parts between dots and underscores)
 * and none of `without`: how the methods' sentences find the value they quote whatever the settings
 * file's exact naming. Null when none does; the full list of settings says every value all the same.
 */
export function findSetting(phrases: readonly SettingPhrase[], words: readonly string[], without: readonly string[] = []): SettingPhrase | null {
  return findSettings(phrases, words, without)[0] ?? null;
}

/** Every setting findSetting would consider, in order. */
export function findSettings(phrases: readonly SettingPhrase[], words: readonly string[], without: readonly string[] = []): SettingPhrase[] {
  return phrases.filter((p) => {
    const parts = new Set(p.key.toLowerCase().split(/[._]/));
    return words.every((w) => parts.has(w)) && !without.some((w) => parts.has(w));
  });
}
