/** `lengthwise curve`: the force–length model at given sarcomere lengths, or across its whole range. */
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import { SETTINGS_OPTION, settingsOption } from './option-files.ts';
import type { Parsed } from './option-values.ts';
import { breakpoints, type FilamentGeometry } from '../model/geometry.ts';
import {
  CURVE_SHAPES,
  DEFAULT_SHAPE,
  LLOYD_BESIER_SHIFT,
  isCurveShape,
  makeMuscleModel,
  muscleModelProblems,
  wholeMuscleShapeNote,
  type MuscleModel,
  type MuscleModelOptions,
} from '../model/muscle-model.ts';
import { DEFAULT_SPECIES, SPECIES, isSpecies } from '../model/species.ts';
import type { RegionKey } from '../model/regions.ts';

const HELP = `usage: lengthwise curve [options]

Prints the sarcomere force–length model: relative active force (0–1) and region at each sarcomere
length. Without --sl, a table across the whole range plus the breakpoints, ready to plot (lines
starting with # are comments; columns are tab-separated).

options:
  --species S            ${SPECIES.join(' | ')}  [default: ${DEFAULT_SPECIES}]
  --filaments LIST       the muscle's own filament lengths, replacing the preset's one by one, e.g.
                         thick=1.6,thin=1.27,bare_zone=0.17,z_disc=0.1 (µm); also steep_zero (µm)
                         and steep_break_force (0–1)
  --between-fibre-sd SD  SD (µm) of sarcomere lengths between the muscle's fibres (0.21 ± 0.09 in a
                         human vastus lateralis, Chen et al. 2016): the force is the mean over fibres
                         in parallel, which rounds the corners  [default: the settings'
                         between_fibre_sd_um, 0: off]  (--dispersion SD is its older name)
  --shape S              ${CURVE_SHAPES.join(' | ')}: which curve gives the
                         force; regions always come from the geometry  [default: ${DEFAULT_SHAPE}]
  --activation A         force at activation A (0–1): the optimal length moves to L0·(λ(1 − A) + 1)
                         (Lloyd & Besier 2003); regions stay  [default: off]
  --activation-shift L   λ of that shift  [default: ${LLOYD_BESIER_SHIFT}]
  --sl LIST              sarcomere lengths (µm), comma-separated, e.g. 2.0,2.7,3.5
  --step UM              spacing of the table without --sl  [default: 0.01]
  --json                 a JSON array of {"sl_um", "force", "region"} instead of text
  --settings FILE        processing settings (lengthwise-settings JSON): its between_fibre_sd_um
  -h, --help             this text`;

const FILAMENT_KEYS: Readonly<Record<string, keyof FilamentGeometry>> = {
  thick: 'thickUm',
  thin: 'thinUm',
  bare_zone: 'bareZoneUm',
  z_disc: 'zDiscUm',
  steep_zero: 'steepZeroUm',
  steep_break_force: 'steepBreakForce',
};


/** Reads `--filaments thick=1.6,thin=1.27,...`; the keys may also carry the calibration file's `_um` suffix. */
export function parseFilaments(text: string): Parsed<Partial<FilamentGeometry>> {
  const out: Partial<Record<keyof FilamentGeometry, number>> = {};
  const accepted = `accepted keys: ${Object.keys(FILAMENT_KEYS).join(', ')} (µm, or 0–1 for steep_break_force), e.g. thick=1.6,thin=1.27`;
  for (const part of text.split(',')) {
    const item = part.trim();
    if (item === '') continue;
    const eq = item.indexOf('=');
    const rawKey = (eq < 0 ? item : item.slice(0, eq)).trim();
    const key = rawKey.endsWith('_um') ? rawKey.slice(0, -3) : rawKey;
    const field = Object.hasOwn(FILAMENT_KEYS, key) ? FILAMENT_KEYS[key] : undefined;
    if (field === undefined) return { ok: false, message: `--filaments: unknown key "${rawKey}"; ${accepted}` };
    const valueText = eq < 0 ? '' : item.slice(eq + 1).trim();
    const value = Number(valueText);
    if (valueText === '' || !Number.isFinite(value)) {
      return { ok: false, message: `--filaments: "${item}" needs a number after "="; ${accepted}` };
    }
    out[field] = value;
  }
  return { ok: true, value: out };
}

/** Reads `--sl 2.0,2.7,3.5`: positive finite lengths in µm. */
export function parseSarcomereLengths(text: string): Parsed<number[]> {
  const values: number[] = [];
  for (const part of text.split(',')) {
    const item = part.trim();
    if (item === '') continue;
    const value = Number(item);
    if (!Number.isFinite(value) || value <= 0) {
      return { ok: false, message: `--sl: "${item}" is not a sarcomere length; give positive numbers in µm, comma-separated, e.g. --sl 2.0,2.7,3.5` };
    }
    values.push(value);
  }
  if (values.length === 0) return { ok: false, message: '--sl: no lengths given; e.g. --sl 2.0,2.7,3.5' };
  return { ok: true, value: values };
}

export interface CurvePoint {
  readonly sl_um: number;
  readonly force: number;
  readonly region: RegionKey;
}

/** The model at each length (at an activation; NaN: full activation, no shift). */
export function curvePoints(model: MuscleModel, lengthsUm: readonly number[], activation = Number.NaN): CurvePoint[] {
  return lengthsUm.map((sl) => ({ sl_um: sl, force: model.forceAtActivation(sl, activation), region: model.regionAt(sl) }));
}

/** Lengths across the whole curve at `stepUm`, with every breakpoint included exactly. */
export function rangeLengths(model: MuscleModel, stepUm: number): number[] {
  const c = model.curve;
  const margin = Math.max(0.2, 3 * model.dispersionSdUm);
  // The grid sits on multiples of the step, so tables of different curves line up.
  const first = Math.max(1, Math.floor((c.steepZeroUm - margin) / stepUm));
  const last = Math.ceil((c.descendingZeroUm + margin) / stepUm);
  const xs: number[] = [];
  for (let i = first; i <= last; i++) xs.push(round(i * stepUm, 6));
  for (const b of breakpoints(c)) xs.push(round(b.slUm, 6));
  return [...new Set(xs)].sort((a, b) => a - b);
}

function round(x: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}

function describeModel(model: MuscleModel, activation: number): string {
  const spread = model.dispersionSdUm > 0 ? `between-fibre SD ${model.dispersionSdUm} µm` : 'no between-fibre spread';
  const optimum = Number.isNaN(activation)
    ? ''
    : `; at activation ${activation} the optimum moves to ${model.optimalUmAt(activation).toFixed(3)} µm (λ ${model.activationShift}, Lloyd & Besier 2003)`;
  return `${model.species}, ${model.shape} force, ${spread}; plateau middle (L0) ${model.optimalUm.toFixed(3)} µm${optimum}`;
}

function textTable(points: readonly CurvePoint[]): string[] {
  return ['sl_um\tforce\tregion', ...points.map((p) => `${p.sl_um.toFixed(3)}\t${p.force.toFixed(4)}\t${p.region}`)];
}

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('curve', HELP, argv, {
    species: { type: 'string', default: DEFAULT_SPECIES },
    filaments: { type: 'string' },
    'between-fibre-sd': { type: 'string' },
    dispersion: { type: 'string' },
    shape: { type: 'string', default: DEFAULT_SHAPE },
    activation: { type: 'string' },
    'activation-shift': { type: 'string' },
    sl: { type: 'string', multiple: true },
    step: { type: 'string', default: '0.01' },
    json: { type: 'boolean', default: false },
    ...SETTINGS_OPTION,
  }, io, { allowPositionals: false });
  if (typeof parsed === 'number') return parsed;
  const { values } = parsed;
  const settings = await settingsOption('curve', values.settings, io);
  if (!settings.ok) return 2;

  const problems: string[] = [];
  const species = values.species;
  if (!isSpecies(species)) problems.push(`--species "${species}" is not known; accepted: ${SPECIES.join(', ')}`);
  const shape = values.shape;
  if (!isCurveShape(shape)) problems.push(`--shape "${shape}" is not known; accepted: ${CURVE_SHAPES.join(', ')}`);
  const named = values['between-fibre-sd'];
  const older = values.dispersion;
  const spreadText = named ?? older ?? String(settings.value.between_fibre_sd_um);
  const spreadOption = named !== undefined ? '--between-fibre-sd' : '--dispersion';
  const dispersionSdUm = Number(spreadText);
  if (spreadText.trim() === '' || !Number.isFinite(dispersionSdUm)) {
    problems.push(`${spreadOption} "${spreadText}" is not a number; give an SD in µm, e.g. ${spreadOption} 0.21 (0 is off)`);
  } else if (named !== undefined && older !== undefined && Number(named) !== Number(older)) {
    problems.push(`--between-fibre-sd ${named} and its older name --dispersion ${older} disagree; give one of them`);
  }
  let activation = Number.NaN;
  if (values.activation !== undefined) {
    activation = Number(values.activation);
    if (values.activation.trim() === '' || !(activation >= 0 && activation <= 1)) {
      problems.push(`--activation "${values.activation}" is not accepted; give an activation from 0 to 1, e.g. --activation 0.25`);
    }
  }
  let activationShift = values.activation !== undefined ? LLOYD_BESIER_SHIFT : 0;
  if (values['activation-shift'] !== undefined) {
    activationShift = Number(values['activation-shift']);
    if (values['activation-shift'].trim() === '' || !Number.isFinite(activationShift)) {
      problems.push(`--activation-shift "${values['activation-shift']}" is not a number; give λ from 0 to 1, e.g. --activation-shift ${LLOYD_BESIER_SHIFT}`);
    } else if (values.activation === undefined) {
      problems.push('--activation-shift needs --activation A: the activation to draw the curve at');
    }
  }
  const stepUm = Number(values.step);
  if (!(Number.isFinite(stepUm) && stepUm >= 0.0001 && stepUm <= 1)) {
    problems.push(`--step "${values.step}" is not accepted; give a spacing from 0.0001 to 1 µm, e.g. --step 0.01`);
  }
  let filaments: Partial<FilamentGeometry> | undefined;
  if (values.filaments !== undefined) {
    const f = parseFilaments(values.filaments);
    if (f.ok) filaments = f.value;
    else problems.push(f.message);
  }
  let lengths: number[] | undefined;
  if (values.sl !== undefined) {
    const s = parseSarcomereLengths(values.sl.join(','));
    if (s.ok) lengths = s.value;
    else problems.push(s.message);
  }
  if (problems.length > 0 || !isSpecies(species) || !isCurveShape(shape)) {
    io.err(problems.map((p) => `lengthwise curve: ${p}`).join('\n'));
    return 2;
  }

  const options: MuscleModelOptions = {
    species,
    shape,
    dispersionSdUm,
    activationShift,
    ...(filaments !== undefined ? { filaments } : {}),
  };
  const modelProblems = muscleModelProblems(options);
  if (modelProblems.length > 0) {
    io.err(modelProblems.map((p) => `lengthwise curve: ${p}`).join('\n'));
    return 2;
  }
  const model = makeMuscleModel(options);
  const points = curvePoints(model, lengths ?? rangeLengths(model, stepUm), activation);
  const note = wholeMuscleShapeNote(model.shape);

  if (values.json) {
    // The JSON array stays an array: the note goes to standard error.
    if (note !== null) io.err(`note: ${note}`);
    io.out(JSON.stringify(points));
    return 0;
  }
  const lines = [`# lengthwise curve: ${describeModel(model, activation)}`];
  if (note !== null) lines.push(`# note: ${note}`);
  if (lengths === undefined) {
    lines.push('# breakpoint\tsl_um\tforce (geometric)');
    for (const b of breakpoints(model.curve)) lines.push(`# ${b.name}\t${b.slUm.toFixed(3)}\t${b.force.toFixed(4)}`);
  }
  lines.push(...textTable(points));
  io.out(lines.join('\n'));
  return 0;
}
