/**
 * The study report's methods: paragraphs of plain text a researcher can adapt for a paper, every number
 * in them read from the study's rows and provenance (the tool and its version, every setting with its
 * unit, the calibrations, how strides were found, how figures are weighed, how groups were averaged).
 */
import { REGION_KEYS, REGION_LABEL } from '../model/regions.ts';
import { CYCLE_GROUP_SUBJECTS } from '../output/study-rows.ts';
import { findSetting, findSettings, numberWords, settingPhrases, type SettingPhrase } from './setting-words.ts';
import { isTrue } from './study-plot-data.ts';
import type { CalibrationUse, StudyReportInput, TrialRow } from './study-report-input.ts';

type MethodsInput = Pick<StudyReportInput, 'trials' | 'groups' | 'comparisons' | 'cycles' | 'provenance'>;

function text(cell: TrialRow[string] | undefined): string | null {
  if (typeof cell === 'string') return cell === '' ? null : cell;
  if (typeof cell === 'number') return String(cell);
  return null;
}

function count(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** "a", "a and b", "a, b and c". */
function list(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1] as string}`;
}

/** "7" or "7–8" for the smallest and largest of some counts. */
function span(values: readonly number[]): string {
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  return lo === hi ? String(lo) : `${lo}–${hi}`;
}

function distinct(values: Iterable<string>): string[] {
  return [...new Set(values)];
}

function numberCell(cell: TrialRow[string] | undefined): number | null {
  return typeof cell === 'number' && Number.isFinite(cell) ? cell : null;
}

/** What the rows say about the study as a whole. */
export interface StudyFacts {
  readonly subjects: string[];
  readonly conditions: string[];
  readonly muscles: string[];
  readonly trials: number;
  readonly excludedTrials: number;
  /** Trial × muscle rows that count (not excluded). */
  readonly recordings: number;
  readonly estimated: number;
  readonly fromEvents: number;
  readonly strides: number | null;
  readonly flagged: number | null;
  readonly species: string[];
}

export function studyFacts(trials: readonly TrialRow[]): StudyFacts {
  const trialKey = (t: TrialRow) => JSON.stringify([t['subject'], t['condition'], t['trial']]);
  const kept = trials.filter((t) => !isTrue(t['exclude']));
  const sum = (column: string): number | null => {
    const values = kept.map((t) => numberCell(t[column])).filter((v): v is number => v !== null);
    return values.length === 0 ? null : values.reduce((a, b) => a + b, 0);
  };
  return {
    subjects: distinct(kept.flatMap((t) => text(t['subject']) ?? [])),
    conditions: distinct(kept.flatMap((t) => text(t['condition']) ?? [])),
    muscles: distinct(kept.flatMap((t) => text(t['muscle']) ?? [])),
    trials: new Set(kept.map(trialKey)).size,
    excludedTrials: new Set(trials.filter((t) => isTrue(t['exclude'])).map(trialKey)).size,
    recordings: kept.length,
    estimated: kept.filter((t) => isTrue(t['segmentation_estimated'])).length,
    fromEvents: kept.filter((t) => t['segmentation_estimated'] === false || t['segmentation_estimated'] === 'false').length,
    strides: sum('stride_count'),
    flagged: sum('flagged_strides'),
    species: distinct(kept.flatMap((t) => text(t['species']) ?? [])),
  };
}

/** A share given as a fraction (0–1) or, by its key, in percent, written in percent. */
function percentWords(p: SettingPhrase): string {
  if (typeof p.raw !== 'number') return p.value;
  if (p.key.endsWith('_percent')) return `${numberWords(p.raw)} %`;
  return p.raw <= 1 ? `${numberWords(p.raw * 100)} %` : p.value;
}

/** The settings the sentences quote, found by the words of their keys. */
function quotedSettings(phrases: readonly SettingPhrase[]) {
  const periods = findSettings(phrases, ['period']);
  const periodMin = periods.find((p) => p.key.includes('min'));
  const periodMax = periods.find((p) => p.key.includes('max'));
  const period =
    periods.length === 1 ? (periods[0] as SettingPhrase).value : periodMin !== undefined && periodMax !== undefined ? `${periodMin.value.replace(/ s$/, '')}–${periodMax.value}` : null;
  const smoothing = findSettings(phrases, ['smoothing']);
  return {
    quality: findSetting(phrases, ['quality']),
    gap: findSetting(phrases, ['gap'], ['flag', 'fraction', 'stride', 'percent']),
    flag: findSetting(phrases, ['flag']),
    window: findSetting(phrases, ['stride', 'window']) ?? findSetting(phrases, ['window'], ['smoothing']),
    period,
    smoothing: (smoothing.length > 0 ? smoothing : findSettings(phrases, ['noise'])).map((p) => `${p.words.replace(/^smoothing /, '')} ${p.value}`),
    plausible: findSetting(phrases, ['plausible']),
  };
}

function processingParagraph(input: MethodsInput, facts: StudyFacts, quoted: ReturnType<typeof quotedSettings>): string {
  const p = input.provenance;
  const species = facts.species.length === 0 ? 'human' : list(facts.species);
  const sentences = [
    `Fascicle-length recordings were processed with ${p.tool} ${p.version}.`,
    quoted.quality !== null ? `Samples with a tracking quality below ${quoted.quality.value} were skipped.` : 'Samples below the quality gate were skipped.',
    `Fascicle length was smoothed with a one-dimensional Kalman filter (random-walk model${quoted.smoothing.length > 0 ? `; ${quoted.smoothing.join(', ')}` : ''}), ` +
      `restarted after every hole in a muscle's samples longer than ${quoted.gap !== null ? quoted.gap.value : 'the gap threshold'}.`,
    "Sarcomere length was estimated from fascicle length through each muscle's calibration (the number of sarcomeres in series) " +
      `and placed on the ${species} sarcomere force–length curve built from filament geometry, whose regions (${list(REGION_KEYS.map((k) => REGION_LABEL[k]))}) give the time spent in each.`,
  ];
  if (quoted.plausible !== null) sentences.push(`Estimates outside ${quoted.plausible.value} would have been reported as implausible (a sign of a wrong calibration or units).`);
  return sentences.join(' ');
}

const SOURCE_WORDS: Readonly<Record<string, readonly [one: string, each: string]>> = {
  file: ['a calibration file', "each subject's calibration file"],
  header: ["the recording's header", "each recording's header"],
  runtime: ['a capture during the session', 'a capture during each session'],
  baseline: ['none', 'none'],
};

/** Where a calibration came from, in words (for one subject or several): a known source, else a file the study names. */
function sourceWords(source: string | null, several: boolean): string {
  if (source === null) return 'an unstated source';
  return (SOURCE_WORDS[source] ?? (SOURCE_WORDS['file'] as readonly [string, string]))[several ? 1 : 0];
}

/** Who a group of calibrations was for: "every subject", "8 subjects", or the few subjects by name. */
function whom(uses: readonly CalibrationUse[], subjectCount: number): string {
  if (uses.some((u) => u.subject === null)) return 'every subject';
  const subjects = distinct(uses.flatMap((u) => u.subject ?? []));
  if (subjectCount > 0 && subjects.length === subjectCount) return subjectCount === 1 ? 'the one subject' : `all ${subjectCount} subjects`;
  return subjects.length <= 3 ? `${count(subjects.length, 'subject')} (${subjects.join(', ')})` : count(subjects.length, 'subject');
}

/** What the calibrations' own provenance says, when they agree (or each value once). */
function detailWords(uses: readonly CalibrationUse[]): string[] {
  const details: string[] = [];
  const how = distinct(uses.flatMap((u) => u.provenance?.method ?? []));
  if (how.length > 0) details.push(how.join(' or '));
  const lengths = distinct(uses.flatMap((u) => (u.provenance?.sarcomere_lengths_um ?? []).map((x) => `${numberWords(x)} µm`)));
  if (lengths.length > 0) details.push(`sarcomere length ${lengths.length <= 4 ? list(lengths) : `${lengths.length} values`}`);
  const from = distinct(uses.flatMap((u) => u.provenance?.sarcomere_length_source ?? []));
  if (from.length > 0) details.push(`from ${from.join('; ')}`);
  const sources = distinct(uses.map((u) => sourceWords(u.source, distinct(uses.flatMap((x) => x.subject ?? [])).length > 1)));
  details.push(`given by ${list(sources)}`);
  return details;
}

function calibrationParagraph(input: MethodsInput, facts: StudyFacts): string {
  const uses = input.provenance.calibration;
  if (uses.length === 0) return 'The outputs record no calibration: how sarcomere length was estimated must be stated from the calibration files.';
  const muscles = distinct([...facts.muscles, ...uses.map((u) => u.muscle)]);
  const sentences: string[] = [];
  for (const muscle of muscles) {
    const mine = uses.filter((u) => u.muscle === muscle);
    if (mine.length === 0) continue;
    const uncalibrated = mine.filter((u) => u.source === 'baseline');
    const calibrated = mine.filter((u) => u.source !== 'baseline');
    const byMethod = distinct(calibrated.map((u) => u.method ?? 'an unstated method'));
    const parts = byMethod.map((method) => {
      const these = calibrated.filter((u) => (u.method ?? 'an unstated method') === method);
      return `by ${method} in ${whom(these, facts.subjects.length)} (${detailWords(these).join('; ')})`;
    });
    if (parts.length > 0) sentences.push(`${muscle} was calibrated ${list(parts)}.`);
    if (uncalibrated.length > 0) {
      sentences.push(
        `${muscle} had no calibration in ${whom(uncalibrated, facts.subjects.length)}: its sarcomere lengths there assume the first seconds at the middle of the plateau and are not measurements.`,
      );
    }
  }
  return sentences.join(' ');
}

function strideParagraph(input: MethodsInput, facts: StudyFacts, quoted: ReturnType<typeof quotedSettings>): string {
  const window = quoted.window !== null ? quoted.window.value : 'the stride-estimation window';
  const estimatedHow =
    `strides were estimated from the muscle's own smoothed fascicle length, because no foot strike of its side came within its first ${window}: ` +
    `the stride period was the dominant period of the signal's autocorrelation over that window${quoted.period !== null ? ` (periods of ${quoted.period} looked for)` : ''}, ` +
    "and each estimated stride starts at the cycle's shortest fascicle length, not at a foot strike, so 0 % of those gait cycles is that minimum and they have no stance or swing";
  const eventsHow = "strides ran from one foot strike of the muscle's side to the next (gait events)";
  const total = facts.recordings;
  let found: string;
  if (facts.estimated === 0 && facts.fromEvents === 0) found = 'How strides were found is not recorded in the trials table.';
  else if (facts.estimated === 0) found = `In all ${count(total, 'trial × muscle recording')}, ${eventsHow}.`;
  else if (facts.fromEvents === 0) found = `In all ${count(total, 'trial × muscle recording')}, ${estimatedHow}.`;
  else found = `In ${facts.fromEvents} of ${count(total, 'trial × muscle recording')}, ${eventsHow}; in the other ${facts.estimated}, ${estimatedHow}.`;
  const flag = quoted.flag !== null ? `more than ${percentWords(quoted.flag)} of its duration` : 'more than the stride flag threshold';
  const flaggedCount = facts.flagged !== null && facts.strides !== null ? ` (${facts.flagged} of ${facts.strides} strides in this study)` : '';
  const points = distinct(input.cycles.filter((c) => c.subject === CYCLE_GROUP_SUBJECTS.mean).map((c) => String(c.percent))).length;
  return [
    found,
    'Every figure is time-weighted: each sample holds until the next (zero-order hold), and percentiles are read from the time spent at each length.',
    `A hole longer than ${quoted.gap !== null ? quoted.gap.value : 'the gap threshold'} and a sample skipped for low quality count as gap time; ` +
      `a stride with gap time of ${flag} was flagged and left out of the trial's figures and of its gait-cycle curve${flaggedCount}.`,
    `A trial's gait-cycle curve is the mean over its unflagged strides of sarcomere length at ${points > 0 ? points : 101} points (0–100 %) of the stride, each stride resampled by linear interpolation.`,
  ].join(' ');
}

function statisticsParagraph(input: MethodsInput, facts: StudyFacts): string {
  const nSubjects = input.groups.map((g) => g.n_subjects);
  const nPairs = input.comparisons.map((c) => c.n_pairs);
  const design =
    `The analysis covers ${count(facts.trials, 'trial')} of ${count(facts.subjects.length, 'subject')} in ${count(facts.conditions.length, 'condition')} (${list(facts.conditions)}), ` +
    `with ${count(facts.muscles.length, 'muscle')} (${list(facts.muscles)})` +
    (facts.excludedTrials > 0 ? `; ${count(facts.excludedTrials, 'trial')} marked excluded in the manifest ${facts.excludedTrials === 1 ? 'was' : 'were'} left out.` : '.');
  const sentences = [
    design,
    "Subjects were the unit of analysis: a subject's value in a condition was the plain mean of that subject's trials in it.",
    `For each condition and muscle we report the mean across subjects, the sample SD and the 95 % confidence interval of the mean from the t distribution with n − 1 degrees of freedom${nSubjects.length > 0 ? ` (n = ${span(nSubjects)} subjects)` : ''}.`,
  ];
  if (nPairs.length > 0) {
    sentences.push(
      `Conditions were compared within subjects with two-sided paired t-tests over the subjects who had both (n = ${span(nPairs)} pairs); the effect size dz is the mean difference divided by the SD of the differences.`,
    );
  }
  sentences.push("Gait-cycle curves were averaged the same way: each subject's mean curve in a condition, then the mean and SD across subjects at each point of the cycle.");
  return sentences.join(' ');
}

function settingsParagraph(phrases: readonly SettingPhrase[]): string {
  if (phrases.length === 0) return 'The outputs record no settings.';
  return `Every setting the figures depend on, as recorded in the outputs' provenance: ${phrases.map((p) => `${p.words} ${p.value}`).join('; ')}.`;
}

/** A paragraph of the methods: a run-in heading and plain text (no markup). */
export interface MethodsParagraph {
  readonly heading: string;
  readonly text: string;
}

/** The methods in reading order: processing, calibration, strides and weighting, statistics, settings. */
export function methodsParagraphs(input: MethodsInput): MethodsParagraph[] {
  const facts = studyFacts(input.trials);
  const phrases = settingPhrases(input.provenance.settings);
  const quoted = quotedSettings(phrases);
  return [
    { heading: 'Processing', text: processingParagraph(input, facts, quoted) },
    { heading: 'Calibration', text: calibrationParagraph(input, facts) },
    { heading: 'Strides and weighting', text: strideParagraph(input, facts, quoted) },
    { heading: 'Statistics', text: statisticsParagraph(input, facts) },
    { heading: 'Settings', text: settingsParagraph(phrases) },
  ];
}
