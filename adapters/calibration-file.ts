/**
 * Calibration JSON (a file, or a stream header's `calibration` field) → CalibrationSpec.
 * Validation lives here, at the edge; failures come back as data with messages a person can act on.
 */
import { readJsonFile, schemaProblems } from './json-file.ts';
import { z } from 'zod';
import type { CalibrationSpec, MuscleCalibration } from '../src/model/calibration.ts';
import type { FilamentGeometry } from '../src/model/geometry.ts';
import { SPECIES } from '../src/model/species.ts';
import { PLAUSIBLE_SARCOMERE_UM } from '../src/model/plausible-sarcomere.ts';
import { CURVE_SHAPES, MAX_DISPERSION_SD_UM, muscleModelProblems } from '../src/model/muscle-model.ts';

/** A finite number within [lo, hi], with a message that names the accepted range and unit. */
function within(lo: number, hi: number, what: string): z.ZodNumber {
  const message = `accepted: ${what} from ${lo} to ${hi}`;
  return z
    .number({ error: `must be a number; ${message}` })
    .finite({ error: `must be finite; ${message}` })
    .min(lo, { error: `too small; ${message}` })
    .max(hi, { error: `too large; ${message}` });
}

const species = z
  .enum(SPECIES, { error: (issue) => `unknown species ${JSON.stringify(issue.input)}; accepted: ${SPECIES.map((s) => `"${s}"`).join(', ')}` })
  .default('human');

const shape = z.enum(CURVE_SHAPES, {
  error: (issue) => `unknown curve shape ${JSON.stringify(issue.input)}; accepted: ${CURVE_SHAPES.map((s) => `"${s}"`).join(', ')}`,
});

/** Our own key names for a muscle's filament lengths; any may be left out to keep the species preset's. */
const filaments = z.strictObject(
  {
    thick_um: within(0.5, 3, 'a thick filament length in µm').optional(),
    thin_um: within(0.3, 3, 'one thin filament, Z-disc edge to tip, in µm').optional(),
    bare_zone_um: within(0, 0.6, 'a bare zone in µm').optional(),
    z_disc_um: within(0, 0.3, 'a Z-disc width in µm').optional(),
    steep_zero_um: within(0.3, 3, "the steep limb's zero-force length in µm").optional(),
    steep_break_force: within(0, 1, 'a relative force at the steep/shallow break').optional(),
  },
  { error: 'unknown key in "filaments"; accepted: thick_um, thin_um, bare_zone_um, z_disc_um, steep_zero_um, steep_break_force' },
);

const common = {
  species,
  filaments: filaments.optional(),
  dispersion_sd_um: within(0, MAX_DISPERSION_SD_UM, 'a sarcomere-length SD in µm (0 is off; about 0.2 within a fibre)').optional(),
  shape: shape.optional(),
};

const muscleCalibrationSchema = z.discriminatedUnion(
  'method',
  [
    z.object({
      ...common,
      method: z.literal('sarcomere_count'),
      sarcomeres_in_series: within(100, 500_000, 'a count of sarcomeres in series'),
      sarcomeres_in_series_sd: within(0, 250_000, 'an SD of that count').optional(),
    }),
    z.object({
      ...common,
      method: z.literal('reference'),
      reference_fascicle_mm: within(1, 1000, 'a fascicle length in mm'),
      reference_sarcomere_um: within(PLAUSIBLE_SARCOMERE_UM.min, PLAUSIBLE_SARCOMERE_UM.max, 'a sarcomere length in µm'),
      reference_sarcomere_sd_um: within(0, 1, 'an SD of the reference sarcomere length in µm').optional(),
      reference_fascicle_sd_mm: within(0, 100, 'an SD of the reference fascicle length in mm').optional(),
    }),
    z.object({
      ...common,
      method: z.literal('optimal_length'),
      optimal_fascicle_mm: within(1, 1000, 'a fascicle length in mm'),
      optimal_fascicle_sd_mm: within(0, 100, 'an SD of the optimal fascicle length in mm').optional(),
    }),
  ],
  { error: 'unknown or missing "method"; accepted: "sarcomere_count", "reference", "optimal_length"' },
);

export const calibrationSchema = z.object({
  muscles: z.record(z.string().min(1, { error: 'a muscle name must not be empty' }), muscleCalibrationSchema, {
    error: 'missing or not an object; accepted: {"muscles": {NAME: {...}, ...}}',
  }),
});

export type CalibrationResult =
  | { readonly ok: true; readonly spec: CalibrationSpec }
  | { readonly ok: false; readonly problems: readonly string[] };

type ParsedMuscle = z.output<typeof muscleCalibrationSchema>;

function toFilaments(f: z.output<typeof filaments>): Partial<FilamentGeometry> {
  return {
    ...(f.thick_um !== undefined ? { thickUm: f.thick_um } : {}),
    ...(f.thin_um !== undefined ? { thinUm: f.thin_um } : {}),
    ...(f.bare_zone_um !== undefined ? { bareZoneUm: f.bare_zone_um } : {}),
    ...(f.z_disc_um !== undefined ? { zDiscUm: f.z_disc_um } : {}),
    ...(f.steep_zero_um !== undefined ? { steepZeroUm: f.steep_zero_um } : {}),
    ...(f.steep_break_force !== undefined ? { steepBreakForce: f.steep_break_force } : {}),
  };
}

function toMuscleCalibration(m: ParsedMuscle): MuscleCalibration {
  const curve = {
    species: m.species,
    ...(m.filaments !== undefined ? { filaments: toFilaments(m.filaments) } : {}),
    ...(m.dispersion_sd_um !== undefined ? { dispersionSdUm: m.dispersion_sd_um } : {}),
    ...(m.shape !== undefined ? { shape: m.shape } : {}),
  };
  switch (m.method) {
    case 'sarcomere_count':
      return {
        ...curve,
        method: m.method,
        sarcomeresInSeries: m.sarcomeres_in_series,
        ...(m.sarcomeres_in_series_sd !== undefined ? { sarcomeresInSeriesSd: m.sarcomeres_in_series_sd } : {}),
      };
    case 'reference':
      return {
        ...curve,
        method: m.method,
        referenceFascicleMm: m.reference_fascicle_mm,
        referenceSarcomereUm: m.reference_sarcomere_um,
        ...(m.reference_sarcomere_sd_um !== undefined ? { referenceSarcomereSdUm: m.reference_sarcomere_sd_um } : {}),
        ...(m.reference_fascicle_sd_mm !== undefined ? { referenceFascicleSdMm: m.reference_fascicle_sd_mm } : {}),
      };
    case 'optimal_length':
      return {
        ...curve,
        method: m.method,
        optimalFascicleMm: m.optimal_fascicle_mm,
        ...(m.optimal_fascicle_sd_mm !== undefined ? { optimalFascicleSdMm: m.optimal_fascicle_sd_mm } : {}),
      };
  }
}

export const HOW_TO_FIX =
  'accepted: {"muscles": {NAME: {"species": "human"|"frog", "method": "sarcomere_count", "sarcomeres_in_series": N} ' +
  '| {"method": "reference", "reference_fascicle_mm": MM, "reference_sarcomere_um": UM, "reference_sarcomere_sd_um"?: UM} ' +
  '| {"method": "optimal_length", "optimal_fascicle_mm": MM}}}, each optionally with "filaments": {"thick_um", "thin_um", ' +
  '"bare_zone_um", "z_disc_um"}, "dispersion_sd_um" and "shape": "geometric"|"gaussian"|"three-gaussian"';

/** Validates an already-parsed JSON value as a calibration. */
export function parseCalibration(value: unknown): CalibrationResult {
  const parsed = calibrationSchema.safeParse(value);
  if (!parsed.success) return { ok: false, problems: schemaProblems(parsed.error, HOW_TO_FIX) };
  const muscles: Record<string, MuscleCalibration> = Object.create(null);
  const problems: string[] = [];
  // The names as the file gives them: zod's record leaves a key named __proto__ out of what it returns
  // (unchecked), and a muscle may have any name, so such an entry is checked here on its own.
  const given = (value as { muscles: Record<string, unknown> }).muscles;
  for (const name of Object.keys(given)) {
    let m: ParsedMuscle;
    if (Object.hasOwn(parsed.data.muscles, name)) m = parsed.data.muscles[name] as ParsedMuscle;
    else {
      const one = muscleCalibrationSchema.safeParse(given[name]);
      if (!one.success) {
        for (const issue of one.error.issues) problems.push(`${['muscles', name, ...issue.path.map(String)].join('.')}: ${issue.message}`);
        continue;
      }
      m = one.data;
    }
    const cal = toMuscleCalibration(m);
    // Filament lengths may each be in range yet not make a curve together (e.g. thick ≥ 2 × thin).
    for (const p of muscleModelProblems({ species: cal.species, ...(cal.filaments !== undefined ? { filaments: cal.filaments } : {}) })) {
      problems.push(`muscles.${name}.filaments: ${p}`);
    }
    muscles[name] = cal;
  }
  if (problems.length > 0) return { ok: false, problems };
  return { ok: true, spec: { muscles } };
}

/**
 * The calibration of one muscle, or a message naming the muscles the calibration has, so a typo in a
 * muscle's name is found rather than silently running uncalibrated.
 */
export function calibrationForMuscle(
  spec: CalibrationSpec,
  muscle: string,
): { readonly ok: true; readonly calibration: MuscleCalibration } | { readonly ok: false; readonly problem: string } {
  const cal = Object.hasOwn(spec.muscles, muscle) ? spec.muscles[muscle] : undefined;
  if (cal !== undefined) return { ok: true, calibration: cal };
  const known = Object.keys(spec.muscles);
  return {
    ok: false,
    problem:
      `the calibration has no muscle "${muscle}"; it has ${known.length > 0 ? known.map((k) => `"${k}"`).join(', ') : 'none'}. ` +
      'Add the muscle to "muscles", or check the spelling of its name in the trial and the calibration.',
  };
}

/** Reads and validates a calibration file; unreadable files and bad JSON are problems too, never throws. */
export function readCalibrationFile(path: string): Promise<CalibrationResult> {
  return readJsonFile(path, 'calibration', HOW_TO_FIX, parseCalibration);
}
