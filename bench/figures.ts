/** The figures the tool and the plain loop must agree on, so the speed comparison is honest. */
import type { SummaryJson } from '../src/output/summary-json.ts';
import { decimalsFor } from '../src/output/output-precision.ts';

export interface MuscleFigures {
  /** Complete strides (flagged ones included). */
  readonly strides: number;
  /** Strides left out for too much gap time. */
  readonly flagged: number;
  /** Time-weighted mean sarcomere length over the unflagged strides (µm). */
  readonly slMeanUm: number | null;
  /** Time-weighted mean relative force from length alone over the unflagged strides. */
  readonly forceMean: number | null;
  /** Time-weighted plateau fraction over the unflagged strides. */
  readonly plateauFraction: number;
}

export interface BenchFigures {
  /** Lines that gave a record or a rejection. */
  readonly received: number;
  readonly accepted: number;
  readonly rejected: number;
  readonly lowQuality: number;
  readonly muscles: Readonly<Record<string, MuscleFigures>>;
}

export function figuresFromSummary(summary: SummaryJson): BenchFigures {
  const muscles: Record<string, MuscleFigures> = {};
  for (const [name, m] of Object.entries(summary.muscles)) {
    muscles[name] = {
      strides: m.trial.stride_count,
      flagged: m.trial.flagged_count,
      slMeanUm: m.trial.sl_mean_um,
      forceMean: m.trial.force_mean,
      plateauFraction: m.trial.region_fraction.plateau,
    };
  }
  return {
    received: summary.frames.received,
    accepted: summary.frames.accepted,
    rejected: summary.frames.rejected,
    lowQuality: summary.frames.low_quality,
    muscles,
  };
}

/** The summary key each compared mean is written under, for its precision (src/output/output-precision.ts). */
const SUMMARY_KEY = { slMeanUm: 'sl_mean_um', forceMean: 'force_mean', plateauFraction: 'plateau' } as const;

/**
 * Where two sets of figures differ; empty when they agree. The tool keeps completed strides' lengths and
 * forces to about 7 significant digits (src/trial/stride-list.ts) and writes each mean rounded to its
 * unit's decimals, so a mean may differ by half its last decimal plus a relative `relativeTolerance`.
 */
export function figureDifferences(a: BenchFigures, b: BenchFigures, relativeTolerance = 1e-6): string[] {
  const out: string[] = [];
  for (const key of ['received', 'accepted', 'rejected', 'lowQuality'] as const) {
    if (a[key] !== b[key]) out.push(`${key}: ${a[key]} vs ${b[key]}`);
  }
  const names = new Set([...Object.keys(a.muscles), ...Object.keys(b.muscles)]);
  for (const name of names) {
    const x = a.muscles[name];
    const y = b.muscles[name];
    if (x === undefined || y === undefined) {
      out.push(`${name}: present in only one`);
      continue;
    }
    if (x.strides !== y.strides) out.push(`${name} strides: ${x.strides} vs ${y.strides}`);
    if (x.flagged !== y.flagged) out.push(`${name} flagged: ${x.flagged} vs ${y.flagged}`);
    for (const key of ['slMeanUm', 'forceMean', 'plateauFraction'] as const) {
      const u = x[key];
      const v = y[key];
      if (u === null || v === null) {
        if (u !== v) out.push(`${name} ${key}: ${String(u)} vs ${String(v)}`);
        continue;
      }
      const written = 0.5 * 10 ** -decimalsFor(SUMMARY_KEY[key]);
      if (!(Math.abs(u - v) <= written + relativeTolerance * Math.max(1, Math.abs(u), Math.abs(v)))) out.push(`${name} ${key}: ${u} vs ${v}`);
    }
  }
  return out;
}
