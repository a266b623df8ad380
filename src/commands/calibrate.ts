/** `lengthwise calibrate FILE`: a calibration from a quiet window of a trial (e.g. standing still). */
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import type { Parsed } from './option-values.ts';
import type { Batch } from '../trial/records.ts';
import { trialSource } from '../../adapters/trial-source.ts';
import type { DeviceMapping } from '../../adapters/device-mapping.ts';
import { mappingOption } from './option-files.ts';
import { parseCalibration } from '../../adapters/calibration-file.ts';
import { DEFAULT_SPECIES, SPECIES, isSpecies } from '../model/species.ts';
import { checkCalibrationAgainstTrial } from '../model/calibration.ts';
import { isPlausibleSarcomereUm, PLAUSIBLE_SARCOMERE_UM } from '../model/plausible-sarcomere.ts';
import { QUIET_SPREAD_FRACTION, sarcomereCountFromReference, summarizeWindow } from '../model/quiet-window.ts';
import { DEFAULT_SKIP_BELOW } from '../pipeline/gate-quality.ts';

const HELP = `usage: lengthwise calibrate FILE --muscle NAME --window START-END --sarcomere-length UM [options]

Reads a quiet window of a trial (the person standing still), takes the muscle's median fascicle length
there and, with the sarcomere length that posture stands for, prints a calibration (JSON, on standard
output) with the muscle's sarcomeres in series filled in. Warns on standard error when the window is
not quiet, or when the count puts the trial's sarcomere lengths outside ${PLAUSIBLE_SARCOMERE_UM.min}–${PLAUSIBLE_SARCOMERE_UM.max} µm.

options:
  --muscle NAME            the muscle to calibrate, as named in the trial
  --window START-END       the quiet window, in seconds of the trial's own clock (its "t"), e.g. 1-4
  --sarcomere-length UM    the sarcomere length (µm) in that posture, e.g. from a biopsy or imaging
  --sd UM                  SD of that sarcomere length (µm); gives the count an SD too
  --species S              ${SPECIES.join(' | ')}  [default: ${DEFAULT_SPECIES}]
  --mapping FILE           a trial in your own columns, units or table layout (lengthwise-mapping JSON)
  --events FILE            gait events from another system, as for replay (read and checked; the window needs none)
  -h, --help               this text

example:
  lengthwise calibrate standing.ndjson --muscle calf --window 1-4 --sarcomere-length 2.7 --sd 0.1 > cal.json`;


/** Reads `--window START-END` (seconds; START may be negative, END must be later). */
export function parseWindow(text: string): Parsed<{ startS: number; endS: number }> {
  const m = /^\s*(-?\d+(?:\.\d+)?)\s*-\s*(-?\d+(?:\.\d+)?)\s*$/.exec(text);
  const hint = 'give START-END in seconds of the trial clock, e.g. --window 1-4 or --window 10.5-13';
  if (m === null) return { ok: false, message: `--window "${text}" is not a window; ${hint}` };
  const startS = Number(m[1]);
  const endS = Number(m[2]);
  if (!(endS > startS)) return { ok: false, message: `--window "${text}" ends before it starts; ${hint}` };
  return { ok: true, value: { startS, endS } };
}

/** Reads a positive sarcomere length (µm) within the plausible range. */
function parseSarcomereUm(option: string, text: string): Parsed<number> {
  const value = Number(text);
  if (text.trim() === '' || !isPlausibleSarcomereUm(value)) {
    return {
      ok: false,
      message: `${option} "${text}" is not accepted; give a sarcomere length from ${PLAUSIBLE_SARCOMERE_UM.min} to ${PLAUSIBLE_SARCOMERE_UM.max} µm, e.g. ${option} 2.7`,
    };
  }
  return { ok: true, value };
}

interface TrialSamples {
  readonly tS: number[];
  readonly fascicleMm: number[];
  skippedLowQuality: number;
  readonly muscles: Set<string>;
}

/** Reads the trial file and keeps the muscle's samples that pass the quality gate. */
function readTrial(path: string, muscle: string, mapping: DeviceMapping | null, eventsPath: string | undefined): Promise<TrialSamples> {
  const trial: TrialSamples = { tS: [], fascicleMm: [], skippedLowQuality: 0, muscles: new Set() };
  return new Promise((resolve, reject) => {
    trialSource(path, { mapping, eventsPath }).subscribe({
      next: (batch: Batch) => {
        for (const f of batch) {
          if (f.kind !== 'sample') continue;
          trial.muscles.add(f.muscle);
          if (f.muscle !== muscle) continue;
          if (f.quality < DEFAULT_SKIP_BELOW) {
            trial.skippedLowQuality++;
            continue;
          }
          trial.tS.push(f.tS);
          trial.fascicleMm.push(f.fascicleMm);
        }
      },
      error: (error: unknown) => reject(error instanceof Error ? error : new Error(String(error))),
      complete: () => resolve(trial),
    });
  });
}

/** Smallest and largest of many values (no spread into arguments: trials can hold millions). */
function range(values: readonly number[]): { min: number; max: number } {
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  for (const v of values) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return { min, max };
}

function mm(x: number): string {
  return `${x.toFixed(2)} mm`;
}

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('calibrate', HELP, argv, {
    muscle: { type: 'string' },
    window: { type: 'string' },
    'sarcomere-length': { type: 'string' },
    sd: { type: 'string' },
    species: { type: 'string', default: DEFAULT_SPECIES },
    mapping: { type: 'string' },
    events: { type: 'string' },
  }, io);
  if (typeof parsed === 'number') return parsed;
  const { values, positionals } = parsed;

  const problems: string[] = [];
  if (positionals.length !== 1) problems.push(`give exactly one trial FILE (got ${positionals.length})`);
  if (values.muscle === undefined || values.muscle === '') problems.push('--muscle NAME is required: the muscle to calibrate, as named in the trial');
  let window: { startS: number; endS: number } | undefined;
  if (values.window === undefined) problems.push('--window START-END is required: the quiet window in seconds, e.g. --window 1-4');
  else {
    const w = parseWindow(values.window);
    if (w.ok) window = w.value;
    else problems.push(w.message);
  }
  let sarcomereUm: number | undefined;
  if (values['sarcomere-length'] === undefined) {
    problems.push('--sarcomere-length UM is required: the sarcomere length in the window’s posture, e.g. --sarcomere-length 2.7');
  } else {
    const s = parseSarcomereUm('--sarcomere-length', values['sarcomere-length']);
    if (s.ok) sarcomereUm = s.value;
    else problems.push(s.message);
  }
  let sdUm: number | undefined;
  if (values.sd !== undefined) {
    const v = Number(values.sd);
    if (values.sd.trim() === '' || !Number.isFinite(v) || v < 0 || v > 1) {
      problems.push(`--sd "${values.sd}" is not accepted; give the sarcomere length's SD from 0 to 1 µm, e.g. --sd 0.1`);
    } else sdUm = v;
  }
  const species = values.species;
  if (!isSpecies(species)) problems.push(`--species "${species}" is not known; accepted: ${SPECIES.join(', ')}`);
  const [path] = positionals;
  const muscle = values.muscle;
  if (problems.length > 0 || path === undefined || muscle === undefined || window === undefined || sarcomereUm === undefined || !isSpecies(species)) {
    io.err(`${problems.map((p) => `lengthwise calibrate: ${p}`).join('\n')}\n(lengthwise calibrate --help for the usage)`);
    return 2;
  }

  const mapping = await mappingOption('calibrate', values.mapping, io);
  if (!mapping.ok) return 2;
  let trial: TrialSamples;
  try {
    trial = await readTrial(path, muscle, mapping.value ?? null, values.events);
  } catch (error) {
    io.err(`lengthwise calibrate: ${(error as Error).message}`);
    return 1;
  }

  if (!trial.muscles.has(muscle)) {
    const found = [...trial.muscles].map((m) => `"${m}"`).join(', ');
    io.err(
      `lengthwise calibrate: ${path} has no samples of muscle "${muscle}"; ` +
        (found === '' ? 'it has no valid samples at all.' : `it has ${found}. Check --muscle.`),
    );
    return 1;
  }
  const summary = summarizeWindow(trial.tS, trial.fascicleMm, window.startS, window.endS);
  if (summary.count === 0) {
    const { min: first, max: last } = range(trial.tS);
    io.err(
      `lengthwise calibrate: no usable sample of "${muscle}" lies in ${window.startS}–${window.endS} s; ` +
        (trial.tS.length > 0 ? `its samples run from ${first} to ${last} s. Choose a window inside that range.` : 'all its samples are below the quality gate.'),
    );
    return 1;
  }

  const count = Math.round(sarcomereCountFromReference(summary.medianMm, sarcomereUm));
  const entry: Record<string, unknown> = { species, method: 'sarcomere_count', sarcomeres_in_series: count };
  if (sdUm !== undefined) entry.sarcomeres_in_series_sd = Math.round((count * sdUm) / sarcomereUm);
  const calibration = { muscles: { [muscle]: entry } };
  // The printed calibration must read back through the file's own validation.
  const check = parseCalibration(calibration);
  if (!check.ok) {
    io.err(`lengthwise calibrate: the result is not a valid calibration:\n${check.problems.join('\n')}`);
    return 1;
  }

  io.err(
    `${muscle}: median fascicle length ${mm(summary.medianMm)} over ${summary.count} samples in ${window.startS}–${window.endS} s ` +
      `(5th–95th percentile ${mm(summary.p5Mm)}–${mm(summary.p95Mm)}) at ${sarcomereUm} µm gives ${count} sarcomeres in series`,
  );
  if (trial.skippedLowQuality > 0) {
    io.err(`${muscle}: ${trial.skippedLowQuality} samples below quality ${DEFAULT_SKIP_BELOW} were left out`);
  }
  if (!summary.quiet) {
    io.err(
      `warning: ${muscle}: the window is not quiet — its fascicle length varies by ${(summary.spreadFraction * 100).toFixed(1)}% ` +
        `(5th–95th percentile over the median; a quiet window stays within ${(QUIET_SPREAD_FRACTION * 100).toFixed(0)}%). ` +
        'Choose a stretch where the person stands still with --window, or check the trial.',
    );
  }
  if (summary.count < 10) {
    io.err(`warning: ${muscle}: only ${summary.count} samples in the window; a longer window gives a steadier median`);
  }
  const fascicle = range(trial.fascicleMm);
  const fit = checkCalibrationAgainstTrial(muscle, count, fascicle.min, fascicle.max);
  if (!fit.ok) io.err(`warning: ${fit.message}`);

  io.out(JSON.stringify(calibration, null, 2));
  return 0;
}
