/**
 * An invented study for the study report's tests, made here from a seeded generator: subjects with
 * invented codes walk and run in invented conditions, each trial × muscle a smooth sarcomere-length
 * cycle placed on the human curve. Its tables are built the way the study's contract lays them out
 * (subjects as the unit, t-based intervals, paired t-tests), so the page is drawn from realistic rows;
 * nothing here checks those statistics.
 */
import { createHash } from 'node:crypto';
import { regionAt } from '../../src/model/geometry.ts';
import { REGION_KEYS } from '../../src/model/regions.ts';
import { speciesCurve } from '../../src/model/species.ts';
import { CYCLE_GROUP_SUBJECTS, type ComparisonRow, type CycleRow, type GroupRow } from '../../src/output/study-rows.ts';
import type { CalibrationUse, StudyMarker, StudyProvenance, StudyReportInput, TrialRow } from '../../src/report/study-report-input.ts';
import { createPrng, deriveSeed } from '../../src/sim/prng.ts';

export interface StudyPlan {
  readonly seed: number;
  readonly subjects: readonly string[];
  /** Each condition with how it moves the cycle: a shift of the middle (µm) and a scale of its depth. */
  readonly conditions: readonly { readonly name: string; readonly shiftUm: number; readonly depthScale: number }[];
  /** Each muscle with its side and its cycle's middle and depth (µm). */
  readonly muscles: readonly { readonly name: string; readonly side: 'left' | 'right'; readonly middleUm: number; readonly depthUm: number }[];
  readonly trialsPerCondition: number;
  /** Subject + condition pairs with no trials (the subject skipped that condition). */
  readonly missing?: readonly (readonly [subject: string, condition: string])[];
  /** Subject + muscle whose strides were estimated (no foot strikes of its side). */
  readonly estimated?: readonly (readonly [subject: string, muscle: string])[];
  /** Subject + muscle with no calibration (on the baseline). */
  readonly uncalibrated?: readonly (readonly [subject: string, muscle: string])[];
  /** Subject + condition + trial marked excluded. */
  readonly excluded?: readonly (readonly [subject: string, condition: string, trial: string])[];
  readonly settings: StudyProvenance['settings'];
  readonly version: string;
}

/** Two-sided 97.5th percentiles of Student's t for 1–30 degrees of freedom (a standard t table, from memory). */
const T_975 = [
  12.706, 4.303, 3.182, 2.776, 2.571, 2.447, 2.365, 2.306, 2.262, 2.228, 2.201, 2.179, 2.16, 2.145, 2.131, 2.12, 2.11, 2.101, 2.093, 2.086, 2.08, 2.074,
  2.069, 2.064, 2.06, 2.056, 2.052, 2.048, 2.045, 2.042,
];

function lnGamma(x: number): number {
  // Lanczos approximation (g = 7, 9 terms), the usual coefficients.
  const c = [0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  const z = x - 1;
  let a = c[0] as number;
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += (c[i] as number) / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Regularized incomplete beta by its continued fraction (Lentz). */
function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  if (x > (a + 1) / (a + b + 2)) return 1 - incompleteBeta(1 - x, b, a);
  const front = Math.exp(lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) + b * Math.log(1 - x)) / a;
  let f = 1;
  let c = 1;
  let d = 0;
  for (let i = 0; i <= 300; i++) {
    const m = Math.floor(i / 2);
    const numerator = i === 0 ? 1 : i % 2 === 0 ? (m * (b - m) * x) / ((a + 2 * m - 1) * (a + 2 * m)) : -((a + m) * (a + b + m) * x) / ((a + 2 * m) * (a + 2 * m + 1));
    d = 1 + numerator * d;
    d = Math.abs(d) < 1e-30 ? 1e-30 : d;
    d = 1 / d;
    c = 1 + numerator / c;
    c = Math.abs(c) < 1e-30 ? 1e-30 : c;
    f *= c * d;
    if (Math.abs(1 - c * d) < 1e-12) break;
  }
  return front * (f - 1);
}

function mean(xs: readonly number[]): number {
  return xs.reduce((a, b) => a + b, 0) / xs.length;
}

function sd(xs: readonly number[]): number {
  const m = mean(xs);
  return Math.sqrt(xs.reduce((a, x) => a + (x - m) ** 2, 0) / (xs.length - 1));
}

function interval(xs: readonly number[]): { mean: number; sd: number | null; low: number | null; high: number | null } {
  const m = mean(xs);
  if (xs.length < 2) return { mean: m, sd: null, low: null, high: null };
  const s = sd(xs);
  const half = (T_975[xs.length - 2] as number) * (s / Math.sqrt(xs.length));
  return { mean: m, sd: s, low: m - half, high: m + half };
}

const round = (x: number, digits: number): number => Number(x.toFixed(digits));

/** The numeric figure columns the generated trials carry, in trials.csv's order. */
export const GENERATED_FIGURES = [
  'stride_count',
  'strides_used',
  'flagged_strides',
  'sl_min_um',
  'sl_max_um',
  'sl_mean_um',
  'sl_p5_um',
  'sl_p95_um',
  ...REGION_KEYS.map((k) => `${k}_fraction`),
  'force_mean',
  'excursion_um',
] as const;

const CURVE = speciesCurve('human');
const POINTS = 101;

/** One trial × muscle's sarcomere length over the cycle, finely sampled (µm). */
function cycleShape(middleUm: number, depthUm: number, phase: number, samples: number): number[] {
  return Array.from({ length: samples }, (_, i) => {
    const a = (2 * Math.PI * i) / (samples - 1);
    return middleUm - (depthUm / 2) * Math.cos(a + phase) + 0.06 * depthUm * Math.sin(2 * a);
  });
}

function figuresOf(fine: readonly number[]): Record<string, number> {
  const sorted = [...fine].sort((a, b) => a - b);
  const at = (q: number) => sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] as number;
  const fractions = Object.fromEntries(REGION_KEYS.map((k) => [`${k}_fraction`, 0]));
  for (const sl of fine) fractions[`${regionAt(CURVE, sl)}_fraction`] = (fractions[`${regionAt(CURVE, sl)}_fraction`] as number) + 1 / fine.length;
  const min = sorted[0] as number;
  const max = sorted[sorted.length - 1] as number;
  return {
    sl_min_um: round(min, 4),
    sl_max_um: round(max, 4),
    sl_mean_um: round(mean(fine), 4),
    sl_p5_um: round(at(0.05), 4),
    sl_p95_um: round(at(0.95), 4),
    ...Object.fromEntries(Object.entries(fractions).map(([k, v]) => [k, round(v, 6)])),
    force_mean: round(0.8 - 0.3 * Math.abs(mean(fine) - 2.72), 6),
    excursion_um: round(max - min, 4),
  };
}

function pairsOf<T>(xs: readonly T[]): [T, T][] {
  return xs.flatMap((a, i) => xs.slice(i + 1).map((b): [T, T] => [a, b]));
}

const has = (list: readonly (readonly string[])[] | undefined, ...key: string[]) => (list ?? []).some((k) => k.every((v, i) => v === key[i]));

/** A whole invented study: its four tables' rows and its provenance. */
export function generatedStudy(plan: StudyPlan): StudyReportInput {
  const trials: TrialRow[] = [];
  const cycles: CycleRow[] = [];
  /** subject → condition → muscle → figure → the trials' values. */
  const perSubject = new Map<string, number[]>();
  const curves = new Map<string, number[][]>();
  const key = (...parts: string[]) => JSON.stringify(parts);
  plan.subjects.forEach((subject, s) => {
    const rng = createPrng(deriveSeed(plan.seed, s));
    const subjectShift = 0.05 * rng.gauss();
    const subjectDepth = 1 + 0.08 * rng.gauss();
    plan.conditions.forEach((condition) => {
      if (has(plan.missing, subject, condition.name)) return;
      for (let t = 1; t <= plan.trialsPerCondition; t++) {
        const trial = `t${t}`;
        const excluded = has(plan.excluded, subject, condition.name, trial);
        for (const muscle of plan.muscles) {
          const middle = muscle.middleUm + condition.shiftUm + subjectShift + 0.015 * rng.gauss();
          const depth = muscle.depthUm * condition.depthScale * subjectDepth * (1 + 0.03 * rng.gauss());
          const phase = 0.2 * rng.gauss();
          const figures = figuresOf(cycleShape(middle, depth, phase, 2001));
          const strideCount = 18 + Math.floor(rng.next() * 10);
          const flagged = rng.next() < 0.3 ? 1 : 0;
          const estimated = has(plan.estimated, subject, muscle.name);
          const uncalibrated = has(plan.uncalibrated, subject, muscle.name);
          const row: Record<string, string | number | boolean | null> = {
            source_file: `trials/${subject}-${condition.name.replaceAll(' ', '-')}-${trial}.ndjson`,
            subject,
            condition: condition.name,
            trial,
            muscle: muscle.name,
            side: muscle.side,
            species: 'human',
            calibration_source: uncalibrated ? 'baseline' : 'file',
            stride_count: strideCount,
            strides_used: strideCount - flagged,
            flagged_strides: flagged,
            ...figures,
            uncalibrated,
            segmentation_estimated: estimated,
            exclude: excluded,
            speed_m_s: condition.name.includes('run') ? 2.8 : 1.3,
          };
          trials.push(row);
          const curve = cycleShape(middle, depth, phase, POINTS).map((v) => round(v, 4));
          curve.forEach((sl, percent) => cycles.push({ subject, condition: condition.name, trial, muscle: muscle.name, percent, sl_um: sl }));
          if (excluded) continue;
          for (const figure of GENERATED_FIGURES) {
            const k = key(subject, condition.name, muscle.name, figure);
            perSubject.set(k, [...(perSubject.get(k) ?? []), row[figure] as number]);
          }
          const ck = key(subject, condition.name, muscle.name);
          curves.set(ck, [...(curves.get(ck) ?? []), curve]);
        }
      }
    });
  });

  /** A subject's value: the plain mean of its trials. */
  const subjectValue = (subject: string, condition: string, muscle: string, figure: string): number | null => {
    const values = perSubject.get(key(subject, condition, muscle, figure));
    return values === undefined ? null : mean(values);
  };

  const groups: GroupRow[] = [];
  for (const condition of plan.conditions) {
    for (const muscle of plan.muscles) {
      for (const figure of GENERATED_FIGURES) {
        const values = plan.subjects.map((s) => subjectValue(s, condition.name, muscle.name, figure)).filter((v): v is number => v !== null);
        const g = interval(values);
        groups.push({ condition: condition.name, muscle: muscle.name, figure, n_subjects: values.length, mean: g.mean, sd: g.sd, ci95_low: g.low, ci95_high: g.high });
      }
      const subjectCurves = plan.subjects.flatMap((s) => {
        const own = curves.get(key(s, condition.name, muscle.name));
        return own === undefined ? [] : [Array.from({ length: POINTS }, (_, p) => mean(own.map((c) => c[p] as number)))];
      });
      for (let p = 0; p < POINTS; p++) {
        const g = interval(subjectCurves.map((c) => c[p] as number));
        cycles.push({ subject: CYCLE_GROUP_SUBJECTS.mean, condition: condition.name, trial: '', muscle: muscle.name, percent: p, sl_um: round(g.mean, 4) });
        cycles.push({ subject: CYCLE_GROUP_SUBJECTS.sd, condition: condition.name, trial: '', muscle: muscle.name, percent: p, sl_um: g.sd === null ? null : round(g.sd, 4) });
      }
    }
  }

  const comparisons: ComparisonRow[] = [];
  for (const [a, b] of pairsOf(plan.conditions.map((c) => c.name))) {
    for (const muscle of plan.muscles) {
      for (const figure of GENERATED_FIGURES) {
        const diffs = plan.subjects.flatMap((s) => {
          const va = subjectValue(s, a, muscle.name, figure);
          const vb = subjectValue(s, b, muscle.name, figure);
          return va === null || vb === null ? [] : [vb - va];
        });
        const d = interval(diffs);
        const t = d.sd === null || d.sd === 0 ? null : d.mean / (d.sd / Math.sqrt(diffs.length));
        const df = diffs.length - 1;
        comparisons.push({
          muscle: muscle.name,
          figure,
          condition_a: a,
          condition_b: b,
          n_pairs: diffs.length,
          mean_diff: d.mean,
          ci95_low: d.low,
          ci95_high: d.high,
          t,
          p: t === null ? null : incompleteBeta(df / (df + t * t), df / 2, 0.5),
          dz: d.sd === null || d.sd === 0 ? null : d.mean / d.sd,
        });
      }
    }
  }

  const digest = (name: string) => createHash('sha256').update(name).digest('hex');
  const files = [...new Set(trials.map((t) => t['source_file'] as string))];
  const calibration: CalibrationUse[] = plan.subjects.flatMap((subject) =>
    plan.muscles.map((m): CalibrationUse =>
      has(plan.uncalibrated, subject, m.name)
        ? { muscle: m.name, subject, method: 'none: its first seconds assumed at the plateau middle', source: 'baseline', provenance: null }
        : {
            muscle: m.name,
            subject,
            method: 'sarcomere count',
            source: 'file',
            provenance: { method: 'one posture', sarcomere_lengths_um: [m.name === plan.muscles[0]?.name ? 2.64 : 2.71], sarcomere_length_source: 'invented laser-diffraction series LD-3' },
          },
    ),
  );
  const markers: StudyMarker[] = [{ subject: plan.subjects[0] as string, condition: plan.conditions[0]?.name as string, trial: 't1', time_s: 12.5, text: 'probe re-taped' }];
  return {
    title: 'Invented gait study',
    trials,
    groups,
    comparisons,
    cycles,
    markers,
    provenance: {
      tool: 'lengthwise',
      version: plan.version,
      created_utc: '2026-12-03T09:30:00Z',
      settings: plan.settings,
      inputs: [
        { path: 'study.csv', bytes: 2048, sha256: digest('study.csv'), kind: 'manifest' },
        { path: 'settings.json', bytes: 412, sha256: digest('settings.json'), kind: 'settings' },
        ...files.map((path, i) => ({ path, bytes: 400_000 + 17 * i, sha256: digest(path), kind: 'trial' })),
      ],
      calibration,
    },
  };
}

/** The study most tests draw: 8 invented subjects, 3 conditions (one subject skipped the run), 2 muscles, 2 trials each. */
export const STUDY_PLAN: StudyPlan = {
  seed: 20261203,
  subjects: ['SYN-501', 'SYN-502', 'SYN-503', 'SYN-504', 'SYN-505', 'SYN-506', 'SYN-507', 'SYN-508'],
  conditions: [
    { name: 'level walk', shiftUm: 0, depthScale: 1 },
    { name: 'incline walk', shiftUm: 0.09, depthScale: 1.1 },
    { name: 'level run', shiftUm: -0.06, depthScale: 1.3 },
  ],
  muscles: [
    { name: 'lat_gastroc', side: 'left', middleUm: 2.62, depthUm: 0.5 },
    { name: 'vastus_lat', side: 'right', middleUm: 2.86, depthUm: 0.62 },
  ],
  trialsPerCondition: 2,
  missing: [['SYN-508', 'level run']],
  estimated: [['SYN-507', 'vastus_lat']],
  uncalibrated: [['SYN-504', 'vastus_lat']],
  excluded: [['SYN-502', 'incline walk', 't2']],
  version: '9.4.2',
  settings: {
    quality_gate: 0.35,
    gap_threshold_s: 0.3,
    stride_flag_threshold: 0.15,
    smoothing: { measurement_noise_mm2: 0.3, process_noise_mm2_per_s: 11 },
    stride_estimation_window_s: 12,
    stride_period_range_s: [0.45, 2.5],
    plausible_sl_um: [1.1, 4.9],
    between_fibre_sd_um: null,
  },
};
