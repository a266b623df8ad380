/**
 * The rows of a study's tables, as their CSV files lay them out (one field a column, in this order): what
 * `summarize --study` computes and writes, and what the study report draws. Numbers are null where a
 * figure is not known (an empty CSV field).
 */

/** groups.csv: one row per condition × muscle × figure; subjects are the unit (a subject's value is the mean of its trials). */
export interface GroupRow {
  readonly condition: string;
  readonly muscle: string;
  /** A numeric column of trials.csv (e.g. sl_mean_um, plateau_fraction). */
  readonly figure: string;
  readonly n_subjects: number;
  readonly mean: number | null;
  /** Sample SD across subjects; null for one subject. */
  readonly sd: number | null;
  /** 95 % confidence interval of the mean, t distribution with n − 1 degrees of freedom; null for one subject. */
  readonly ci95_low: number | null;
  readonly ci95_high: number | null;
}

/** comparisons.csv: for a pair of conditions, a muscle and a figure, over the subjects who have both (paired t-test, two-sided). */
export interface ComparisonRow {
  readonly muscle: string;
  readonly figure: string;
  readonly condition_a: string;
  readonly condition_b: string;
  readonly n_pairs: number;
  /** Mean of (b − a). */
  readonly mean_diff: number | null;
  readonly ci95_low: number | null;
  readonly ci95_high: number | null;
  readonly t: number | null;
  readonly p: number | null;
  /** Mean difference / SD of the differences. */
  readonly dz: number | null;
}

/**
 * cycles.csv: sarcomere length over the gait cycle, 101 points (percent 0…100) per trial × muscle, then per
 * condition × muscle the group mean and SD across subjects, as rows whose subject is "mean" or "sd" (trial empty).
 */
export interface CycleRow {
  readonly subject: string;
  readonly condition: string;
  readonly trial: string;
  readonly muscle: string;
  readonly percent: number;
  readonly sl_um: number | null;
}

/** The subject values of the "mean" and "sd" rows of cycles.csv. */
export const CYCLE_GROUP_SUBJECTS = { mean: 'mean', sd: 'sd' } as const;
