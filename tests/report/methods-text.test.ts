import { describe, expect, it } from 'vitest';
import { methodsParagraphs } from '../../src/report/methods-text.ts';
import type { StudyReportInput } from '../../src/report/study-report-input.ts';
import { expectToContainEach } from '../helpers/text-checks.ts';
import { generatedStudy, STUDY_PLAN, type StudyPlan } from './generated-study.ts';

const study = generatedStudy(STUDY_PLAN);
const paragraphs = methodsParagraphs(study).map((p) => p.text);
const text = paragraphs.join('\n');

/** The methods' paragraphs of another study, as text. */
function methodsOf(input: StudyReportInput): string[] {
  return methodsParagraphs(input).map((p) => p.text);
}

/** The trials rows that count (not marked excluded). */
const kept = study.trials.filter((t) => t['exclude'] !== true);

function studyWith(changes: Partial<StudyPlan>): StudyReportInput {
  return generatedStudy({ ...STUDY_PLAN, ...changes });
}

describe('methodsParagraphs', () => {
  it('is plain text in five paragraphs: processing, calibration, strides and weighting, statistics, settings', () => {
    expect(methodsParagraphs(study).map((p) => p.heading)).toEqual(['Processing', 'Calibration', 'Strides and weighting', 'Statistics', 'Settings']);
    for (const p of paragraphs) expect(p).not.toMatch(/[<>]/);
    expect(paragraphs[0]).toMatch(/^Fascicle-length recordings were processed with /);
    expect(paragraphs[1]).toMatch(/^lat_gastroc was calibrated /);
    expect(paragraphs[3]).toMatch(/^The analysis covers /);
    expect(paragraphs[4]).toMatch(/^Every setting the figures depend on/);
  });

  it("states the tool and its version from the study's provenance", () => {
    expect(paragraphs[0]).toContain('processed with lengthwise 9.4.2.');
    const other = methodsOf({ ...study, provenance: { ...study.provenance, tool: 'lengthwise', version: '0.0.7-rc.2' } });
    expect(other[0]).toContain('processed with lengthwise 0.0.7-rc.2.');
  });

  it('quotes each setting that shaped the numbers in its sentence, with its unit', () => {
    expectToContainEach(text, [
      'tracking quality below 0.35 were skipped',
      'random-walk model; measurement noise 0.3 mm², process noise 11 mm²/s',
      "every hole in a muscle's samples longer than 0.3 s",
      'A hole longer than 0.3 s and a sample skipped for low quality count as gap time',
      // The flag threshold is a fraction of the stride in the settings; the sentence says it in percent.
      'gap time of more than 15 % of its duration was flagged',
      'within its first 12 s',
      'periods of 0.45–2.5 s looked for',
      'Estimates outside 1.1–4.9 µm',
    ]);
  });

  it('lists every setting with its value and unit, nested ones under their parent, short forms in full', () => {
    expect(paragraphs[4]).toBe(
      "Every setting the figures depend on, as recorded in the outputs' provenance: quality gate 0.35; gap threshold 0.3 s; stride flag threshold 0.15; " +
        'smoothing measurement noise 0.3 mm²; smoothing process noise 11 mm²/s; stride estimation window 12 s; stride period range 0.45–2.5 s; ' +
        'plausible sarcomere length 1.1–4.9 µm; between fibre SD off.',
    );
  });

  it('finds the quoted settings whatever their keys are called, and says a setting it has no sentence for in the list', () => {
    const renamed = studyWith({
      settings: { quality_gate: 0.5, gap_s: 0.2, stride_flag_gap_fraction: 0.05, estimate_window_s: 8, stride_period_min_s: 0.3, stride_period_max_s: 4, sample_rate_hz: 120 },
    });
    const words = methodsOf(renamed).join('\n');
    expectToContainEach(words, [
      'tracking quality below 0.5 were skipped',
      'longer than 0.2 s',
      'more than 5 % of its duration',
      'within its first 8 s',
      'periods of 0.3–4 s looked for',
      'sample rate 120 Hz',
    ]);
    // A smoothing window is not the stride-estimation window.
    const smoothingWindow = methodsOf(studyWith({ settings: { smoothing: { window_s: 0.05 }, stride_estimation_window_s: 9 } })).join('\n');
    expect(smoothingWindow).toContain('within its first 9 s');
    // No plausible range among these settings: no sentence about it, rather than a number from elsewhere.
    expect(words).not.toContain('implausible');
  });

  it('says how strides were found, counting the trial × muscle rows found from events and estimated', () => {
    const estimated = kept.filter((t) => t['segmentation_estimated'] === true).length;
    expect(estimated).toBe(6);
    expect(text).toContain(`In ${kept.length - estimated} of ${kept.length} trial × muscle recordings, strides ran from one foot strike of the muscle's side to the next (gait events); in the other ${estimated}, strides were estimated`);
    expect(text).toContain("each estimated stride starts at the cycle's shortest fascicle length, not at a foot strike, so 0 % of those gait cycles is that minimum");
    const allEvents = methodsOf(studyWith({ estimated: [] })).join('\n');
    expect(allEvents).toContain(`In all ${kept.length} trial × muscle recordings, strides ran from one foot strike`);
    expect(allEvents).not.toContain('strides were estimated');
  });

  it('says how figures are weighed and counts the flagged strides the trials rows carry', () => {
    const flagged = kept.reduce((a, t) => a + (t['flagged_strides'] as number), 0);
    const strides = kept.reduce((a, t) => a + (t['stride_count'] as number), 0);
    expect(flagged).toBeGreaterThan(0);
    expectToContainEach(text, [
      'Every figure is time-weighted: each sample holds until the next (zero-order hold)',
      `left out of the trial's figures and of its gait-cycle curve (${flagged} of ${strides} strides in this study)`,
      'at 101 points (0–100 %) of the stride',
    ]);
  });

  it("names each muscle's calibration method, where it came from, and the subjects left uncalibrated", () => {
    expect(paragraphs[1]).toBe(
      'lat_gastroc was calibrated by sarcomere count in all 8 subjects (one posture; sarcomere length 2.64 µm; from invented laser-diffraction series LD-3; ' +
        "given by each subject's calibration file). vastus_lat was calibrated by sarcomere count in 7 subjects (one posture; sarcomere length 2.71 µm; " +
        "from invented laser-diffraction series LD-3; given by each subject's calibration file). vastus_lat had no calibration in 1 subject (SYN-504): " +
        'its sarcomere lengths there assume the first seconds at the middle of the plateau and are not measurements.',
    );
    const mixed = methodsOf({
      ...study,
      provenance: {
        ...study.provenance,
        calibration: [
          { muscle: 'lat_gastroc', subject: null, method: 'prior from published architecture', source: 'header', provenance: { sarcomere_length_source: 'an invented atlas, table 2' } },
        ],
      },
    });
    expect(mixed[1]).toBe("lat_gastroc was calibrated by prior from published architecture in every subject (from an invented atlas, table 2; given by the recording's header).");
  });

  it('says how groups were averaged, with the numbers of subjects and pairs the tables give', () => {
    expectToContainEach(paragraphs[3], [
      'The analysis covers 45 trials of 8 subjects in 3 conditions (level walk, incline walk and level run), with 2 muscles (lat_gastroc and vastus_lat)',
      '1 trial marked excluded in the manifest was left out.',
      "Subjects were the unit of analysis: a subject's value in a condition was the plain mean of that subject's trials in it.",
      'the 95 % confidence interval of the mean from the t distribution with n − 1 degrees of freedom (n = 7–8 subjects)',
      'two-sided paired t-tests over the subjects who had both (n = 7–8 pairs); the effect size dz is the mean difference divided by the SD of the differences',
    ]);
    const n = methodsOf({ ...study, groups: study.groups.map((g) => ({ ...g, n_subjects: 12 })), comparisons: study.comparisons.map((c) => ({ ...c, n_pairs: 11 })) });
    expect(n[3]).toContain('(n = 12 subjects)');
    expect(n[3]).toContain('(n = 11 pairs)');
  });

  it('leaves out the comparison sentence when the study has one condition', () => {
    const one = studyWith({ conditions: [STUDY_PLAN.conditions[0]!] });
    expect(one.comparisons).toEqual([]);
    const words = methodsOf(one).join('\n');
    expect(words).toContain('in 1 condition (level walk)');
    expect(words).not.toContain('paired t-test');
  });

  it('says so when the provenance records no settings and no calibration', () => {
    const bare = methodsOf({ ...study, provenance: { ...study.provenance, settings: {}, calibration: [] } });
    expect(bare[4]).toBe('The outputs record no settings.');
    expect(bare[1]).toContain('The outputs record no calibration');
    expect(bare[0]).toContain('Samples below the quality gate were skipped.');
    expect(bare[0]).toContain('longer than the gap threshold.');
  });
});
