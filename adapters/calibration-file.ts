/**
 * Calibration JSON (a file, or a stream header's `calibration` field) → CalibrationSpec.
 * Validation lives here, at the edge; failures come back as data with messages a person can act on.
 */
import { readJsonFile, schemaProblems } from './json-file.ts';
import { z } from 'zod';
import { sarcomereCountSpread, type CalibrationProvenance, type CalibrationSpec, type MuscleCalibration } from '../src/model/calibration.ts';
import { spreadProblem } from '../src/model/count-spread.ts';
import { curveForCalibration } from '../src/model/calibration-curve.ts';
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

/** Where a calibration came from (written by `lengthwise calibrate`); every key may be left out. */
const provenance = z.object({
  method: z.string().max(200).optional(),
  source_file: z.string().max(4096).optional(),
  source_sha256: z.string().regex(/^[0-9a-f]{64}$/, { error: 'accepted: 64 lower-case hex digits' }).optional(),
  windows_s: z.array(z.tuple([z.number().finite(), z.number().finite()])).max(16).optional(),
  sarcomere_lengths_um: z.array(z.number().finite()).max(16).optional(),
  sarcomere_length_source: z.string().max(2000).optional(),
  created_utc: z.string().max(64).optional(),
  tool_version: z.string().max(64).optional(),
});

const betweenFibreSd = within(0, MAX_DISPERSION_SD_UM, 'an SD of sarcomere length between fibres in µm (0 is off; 0.21 in a human vastus lateralis)');

const common = {
  species,
  filaments: filaments.optional(),
  between_fibre_sd_um: betweenFibreSd.optional(),
  /** The older name of between_fibre_sd_um, still read. */
  dispersion_sd_um: betweenFibreSd.optional(),
  shape: shape.optional(),
  activation_shift: within(0, 1, 'λ of the activation-dependent optimal length (0.15 in Lloyd & Besier 2003)').optional(),
  activation: within(0, 1, 'an activation from 0 to 1').optional(),
  provenance: provenance.optional(),
};

const muscleCalibrationSchema = z.discriminatedUnion(
  'method',
  [
    z.strictObject({
      ...common,
      method: z.literal('sarcomere_count'),
      sarcomeres_in_series: within(100, 500_000, 'a count of sarcomeres in series'),
      sarcomeres_in_series_sd: within(0, 250_000, 'an SD of that count').optional(),
      sarcomeres_in_series_sd_from: z
        .enum(['count', 'sarcomere_length'], { error: 'accepted: "count" (the default) or "sarcomere_length"' })
        .optional(),
      fascicle_offset_mm: within(-100, 100, 'the constant part of the tracked length in mm').optional(),
    }),
    z.strictObject({
      ...common,
      method: z.literal('reference'),
      reference_fascicle_mm: within(1, 1000, 'a fascicle length in mm'),
      reference_sarcomere_um: within(PLAUSIBLE_SARCOMERE_UM.min, PLAUSIBLE_SARCOMERE_UM.max, 'a sarcomere length in µm'),
      reference_sarcomere_sd_um: within(0, 1, 'an SD of the reference sarcomere length in µm').optional(),
      reference_fascicle_sd_mm: within(0, 100, 'an SD of the reference fascicle length in mm').optional(),
    }),
    z.strictObject({
      ...common,
      method: z.literal('optimal_length'),
      optimal_fascicle_mm: within(1, 1000, 'a fascicle length in mm'),
      optimal_fascicle_sd_mm: within(0, 100, 'an SD of the optimal fascicle length in mm').optional(),
    }),
    z.object({
      ...common,
      method: z.literal('architecture_prior'),
      prior_fibre_mm: within(1, 1000, 'a published fibre length in mm'),
      prior_fibre_sd_mm: within(0, 500, 'an SD of that fibre length in mm').optional(),
      prior_sarcomere_um: within(1, 5, 'the sarcomere length in µm the fibre length is normalised to'),
      prior_source: z
        .string({ error: 'accepted: the publication the values come from, e.g. "Ward et al. 2009, Clin Orthop Relat Res 467:1074–1082, Table 1"' })
        .min(1, { error: 'must name the publication the values come from' })
        .max(500),
    }),
  ],
  { error: 'unknown or missing "method"; accepted: "sarcomere_count", "reference", "optimal_length", "architecture_prior"' },
);

export const calibrationSchema = z.strictObject({
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

function toProvenance(p: z.output<typeof provenance>): CalibrationProvenance {
  return {
    ...(p.method !== undefined ? { method: p.method } : {}),
    ...(p.source_file !== undefined ? { sourceFile: p.source_file } : {}),
    ...(p.source_sha256 !== undefined ? { sourceSha256: p.source_sha256 } : {}),
    ...(p.windows_s !== undefined ? { windowsS: p.windows_s } : {}),
    ...(p.sarcomere_lengths_um !== undefined ? { sarcomereLengthsUm: p.sarcomere_lengths_um } : {}),
    ...(p.sarcomere_length_source !== undefined ? { sarcomereLengthSource: p.sarcomere_length_source } : {}),
    ...(p.created_utc !== undefined ? { createdUtc: p.created_utc } : {}),
    ...(p.tool_version !== undefined ? { toolVersion: p.tool_version } : {}),
  };
}

function toMuscleCalibration(m: ParsedMuscle): MuscleCalibration {
  const betweenFibreSdUm = m.between_fibre_sd_um ?? m.dispersion_sd_um;
  const curve = {
    species: m.species,
    ...(m.filaments !== undefined ? { filaments: toFilaments(m.filaments) } : {}),
    ...(betweenFibreSdUm !== undefined ? { dispersionSdUm: betweenFibreSdUm } : {}),
    ...(m.shape !== undefined ? { shape: m.shape } : {}),
    ...(m.activation_shift !== undefined ? { activationShift: m.activation_shift } : {}),
    ...(m.activation !== undefined ? { activation: m.activation } : {}),
    ...(m.provenance !== undefined ? { provenance: toProvenance(m.provenance) } : {}),
  };
  switch (m.method) {
    case 'sarcomere_count':
      return {
        ...curve,
        method: m.method,
        sarcomeresInSeries: m.sarcomeres_in_series,
        ...(m.sarcomeres_in_series_sd !== undefined ? { sarcomeresInSeriesSd: m.sarcomeres_in_series_sd } : {}),
        ...(m.sarcomeres_in_series_sd_from !== undefined ? { sarcomeresInSeriesSdFrom: m.sarcomeres_in_series_sd_from } : {}),
        ...(m.fascicle_offset_mm !== undefined ? { fascicleOffsetMm: m.fascicle_offset_mm } : {}),
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
    case 'architecture_prior':
      return {
        ...curve,
        method: m.method,
        priorFibreMm: m.prior_fibre_mm,
        priorSarcomereUm: m.prior_sarcomere_um,
        priorSource: m.prior_source,
        ...(m.prior_fibre_sd_mm !== undefined ? { priorFibreSdMm: m.prior_fibre_sd_mm } : {}),
      };
  }
}

export const HOW_TO_FIX =
  'accepted: {"muscles": {NAME: {"species": "human"|"frog", "method": "sarcomere_count", "sarcomeres_in_series": N} ' +
  '| {"method": "reference", "reference_fascicle_mm": MM, "reference_sarcomere_um": UM, "reference_sarcomere_sd_um"?: UM} ' +
  '| {"method": "optimal_length", "optimal_fascicle_mm": MM} ' +
  '| {"method": "architecture_prior", "prior_fibre_mm": MM, "prior_sarcomere_um": UM, "prior_source": TEXT}}}, each optionally with ' +
  '"filaments": {"thick_um", "thin_um", "bare_zone_um", "z_disc_um"}, "between_fibre_sd_um", "activation_shift", "activation" ' +
  'and "shape": "geometric"|"gaussian"|"three-gaussian"';

/** Validates an already-parsed JSON value as a calibration. */
export function parseCalibration(value: unknown): CalibrationResult {
  const parsed = calibrationSchema.safeParse(value);
  if (!parsed.success) return { ok: false, problems: schemaProblems(parsed.error, HOW_TO_FIX, calibrationSchema, value) };
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
    if (m.between_fibre_sd_um !== undefined && m.dispersion_sd_um !== undefined && m.between_fibre_sd_um !== m.dispersion_sd_um) {
      problems.push(
        `muscles.${name}: "between_fibre_sd_um" (${m.between_fibre_sd_um}) and its older name "dispersion_sd_um" (${m.dispersion_sd_um}) disagree; give one of them`,
      );
      continue;
    }
    const cal = toMuscleCalibration(m);
    // Filament lengths may each be in range yet not make a curve together (e.g. thick ≥ 2 × thin).
    for (const p of muscleModelProblems({ species: cal.species, ...(cal.filaments !== undefined ? { filaments: cal.filaments } : {}) })) {
      problems.push(`muscles.${name}.filaments: ${p}`);
    }
    const spread = spreadProblem(sarcomereCountSpread(cal, curveForCalibration(cal)));
    if (spread !== null) problems.push(`muscles.${name}: ${spread}`);
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
