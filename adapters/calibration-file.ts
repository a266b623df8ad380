/**
 * Calibration JSON (a file, or a stream header's `calibration` field) → CalibrationSpec.
 * Validation lives here, at the edge; failures come back as data with messages a person can act on.
 */
import { readFile } from 'node:fs/promises';
import { z } from 'zod';
import type { CalibrationSpec, MuscleCalibration } from '../src/model/calibration.ts';
import { SPECIES } from '../src/model/species.ts';

const positive = z.number().finite().positive();
const species = z.enum(SPECIES).default('human');

const muscleCalibrationSchema = z.discriminatedUnion('method', [
  z.object({ species, method: z.literal('sarcomere_count'), sarcomeres_in_series: positive }),
  z.object({ species, method: z.literal('reference'), reference_fascicle_mm: positive, reference_sarcomere_um: positive }),
  z.object({ species, method: z.literal('optimal_length'), optimal_fascicle_mm: positive }),
]);

export const calibrationSchema = z.object({
  muscles: z.record(z.string().min(1), muscleCalibrationSchema),
});

export type CalibrationResult =
  | { readonly ok: true; readonly spec: CalibrationSpec }
  | { readonly ok: false; readonly problems: readonly string[] };

function toMuscleCalibration(m: z.output<typeof muscleCalibrationSchema>): MuscleCalibration {
  switch (m.method) {
    case 'sarcomere_count':
      return { species: m.species, method: m.method, sarcomeresInSeries: m.sarcomeres_in_series };
    case 'reference':
      return {
        species: m.species,
        method: m.method,
        referenceFascicleMm: m.reference_fascicle_mm,
        referenceSarcomereUm: m.reference_sarcomere_um,
      };
    case 'optimal_length':
      return { species: m.species, method: m.method, optimalFascicleMm: m.optimal_fascicle_mm };
  }
}

const HOW_TO_FIX =
  'accepted: {"muscles": {NAME: {"species": "human"|"frog", "method": "sarcomere_count", "sarcomeres_in_series": N} ' +
  '| {"method": "reference", "reference_fascicle_mm": MM, "reference_sarcomere_um": UM} ' +
  '| {"method": "optimal_length", "optimal_fascicle_mm": MM}}}';

/** Validates an already-parsed JSON value as a calibration. */
export function parseCalibration(value: unknown): CalibrationResult {
  const parsed = calibrationSchema.safeParse(value);
  if (!parsed.success) {
    const problems = parsed.error.issues.map((issue) => {
      const where = issue.path.length > 0 ? issue.path.join('.') : '(top level)';
      return `${where}: ${issue.message}`;
    });
    return { ok: false, problems: [...problems, HOW_TO_FIX] };
  }
  const muscles: Record<string, MuscleCalibration> = Object.create(null);
  for (const [name, m] of Object.entries(parsed.data.muscles)) muscles[name] = toMuscleCalibration(m);
  return { ok: true, spec: { muscles } };
}

/** Reads and validates a calibration file; unreadable files and bad JSON are problems too, never throws. */
export async function readCalibrationFile(path: string): Promise<CalibrationResult> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
    return { ok: false, problems: [`cannot read calibration file ${path} (${code}); check the path and its permissions`] };
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    return { ok: false, problems: [`calibration file ${path} is not valid JSON: ${(error as Error).message}`, HOW_TO_FIX] };
  }
  const result = parseCalibration(value);
  return result.ok ? result : { ok: false, problems: result.problems.map((p) => `${path}: ${p}`) };
}
