/** `lengthwise calibrate`: a calibration from one or two quiet postures of a trial, or a prior from published architecture. */
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import type { Parsed } from './option-values.ts';
import type { Batch } from '../trial/records.ts';
import { trialSource } from '../../adapters/trial-source.ts';
import type { DeviceMapping } from '../../adapters/device-mapping.ts';
import { fileDigest } from '../../adapters/file-digest.ts';
import { mappingOption, SETTINGS_OPTION, settingsOption } from './option-files.ts';
import { parseCalibration } from '../../adapters/calibration-file.ts';
import { DEFAULT_SPECIES, SPECIES, isSpecies } from '../model/species.ts';
import { ARCHITECTURE_PRIOR_CAUTION, METHOD_LABEL, checkCalibrationAgainstTrial } from '../model/calibration.ts';
import { isPlausibleSarcomereUm, PLAUSIBLE_SARCOMERE_UM, type SarcomereRange } from '../model/plausible-sarcomere.ts';
import { plausibleSarcomereRange } from '../trial/settings.ts';
import { POSTURE_DISAGREEMENT_FRACTION, QUIET_SPREAD_FRACTION, sarcomereCountFromReference, summarizeWindow, twoPostureCount } from '../model/quiet-window.ts';
import { MAX_RELATIVE_SD, spreadProblem } from '../model/count-spread.ts';
import { toolVersion } from '../run/tool-version.ts';

const HELP = `usage: lengthwise calibrate FILE --muscle NAME --window START-END --sarcomere-length UM [options]
       lengthwise calibrate FILE --muscle NAME --window A-B --sarcomere-length X --window C-D --sarcomere-length Y
       lengthwise calibrate [FILE] --muscle NAME --prior-fibre-mm MM --prior-sarcomere-length UM --prior-source TEXT

Prints a calibration (JSON, on standard output) for one muscle; standard error says what it used.

One posture: takes the muscle's median fascicle length over a quiet window of the trial (the person
standing still) and, with the sarcomere length that posture stands for, gives the sarcomeres in series.

Two postures (--window and --sarcomere-length twice, in pairs): N = the change in fascicle length over the
change in sarcomere length, which holds whatever constant part the tracked length has (aponeurosis or
tendon pieces in the tracked line, a tracking offset); that part is given as fascicle_offset_mm. It prints
each posture's own count beside it, and warns when they disagree by more than
${(POSTURE_DISAGREEMENT_FRACTION * 100).toFixed(0)}%.

Prior from published architecture: N = a muscle's published fibre length over the sarcomere length it
is normalised to (e.g. dissection data normalised to 2.7 µm). A prior, not a measurement: cadaveric fibre
length is not the living fascicle length.

Warns when a window is not quiet, or when the count puts the trial's sarcomere lengths outside
the plausible range (${PLAUSIBLE_SARCOMERE_UM.min}–${PLAUSIBLE_SARCOMERE_UM.max} µm unless --settings says otherwise), in which the sarcomere
lengths given must lie too. Refuses SDs that give the count a relative SD above ${MAX_RELATIVE_SD}.

options:
  --muscle NAME                  the muscle to calibrate, as named in the trial
  --window START-END             a quiet window, in seconds of the trial's own clock (its "t"), e.g. 1-4;
                                 give it twice for two postures
  --sarcomere-length UM          the sarcomere length (µm) in that window's posture, e.g. from a biopsy or
                                 imaging; one for each --window, in the same order
  --sd UM                        SD of that sarcomere length (µm), one for each --sarcomere-length; gives
                                 the count an SD too
  --sarcomere-source TEXT        where the sarcomere lengths come from (kept in the calibration)
  --prior-fibre-mm MM            a published fibre length (mm)
  --prior-fibre-sd-mm MM         its SD across specimens (mm)
  --prior-sarcomere-length UM    the sarcomere length it is normalised to (µm)
  --prior-source TEXT            the publication: authors, year, journal, table
  --species S                    ${SPECIES.join(' | ')}  [default: ${DEFAULT_SPECIES}]
  --settings FILE                processing settings (lengthwise-settings JSON): its quality gate and plausible range
  --mapping FILE                 a trial in your own columns, units or table layout (lengthwise-mapping JSON)
  --events FILE                  gait events from another system, as for replay (read and checked; the window needs none)
  -h, --help                     this text

examples:
  lengthwise calibrate standing.ndjson --muscle calf --window 1-4 --sarcomere-length 2.7 --sd 0.1 > cal.json
  lengthwise calibrate postures.ndjson --muscle thigh --window 1-4 --sarcomere-length 2.84 --window 10-13 --sarcomere-length 3.17 > cal.json`;


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

/** Reads a positive sarcomere length (µm) within the plausible range (the settings'). */
function parseSarcomereUm(option: string, text: string, plausible: SarcomereRange): Parsed<number> {
  const value = Number(text);
  if (text.trim() === '' || !isPlausibleSarcomereUm(value, plausible)) {
    return {
      ok: false,
      message: `${option} "${text}" is not accepted; give a sarcomere length from ${plausible.min} to ${plausible.max} µm, e.g. ${option} 2.7`,
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
function readTrial(path: string, muscle: string, mapping: DeviceMapping | null, eventsPath: string | undefined, qualityGate: number): Promise<TrialSamples> {
  const trial: TrialSamples = { tS: [], fascicleMm: [], skippedLowQuality: 0, muscles: new Set() };
  return new Promise((resolve, reject) => {
    trialSource(path, { mapping, eventsPath }).subscribe({
      next: (batch: Batch) => {
        for (const f of batch) {
          if (f.kind !== 'sample') continue;
          trial.muscles.add(f.muscle);
          if (f.muscle !== muscle) continue;
          if (f.quality < qualityGate) {
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

/** A number option within [lo, hi]; a message naming the option, the range and an example otherwise. */
function parseNumber(option: string, text: string, lo: number, hi: number, unit: string, example: string): Parsed<number> {
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value) || value < lo || value > hi) {
    return { ok: false, message: `${option} "${text}" is not accepted; give ${unit} from ${lo} to ${hi}, e.g. ${option} ${example}` };
  }
  return { ok: true, value };
}

/** What the options ask for: one or two postures of the trial, or a prior from published architecture. */
type Plan =
  | { readonly kind: 'postures'; readonly windows: ReadonlyArray<{ startS: number; endS: number }>; readonly sarcomereUm: readonly number[]; readonly sdUm: readonly number[] | null }
  | { readonly kind: 'prior'; readonly fibreMm: number; readonly fibreSdMm: number | null; readonly sarcomereUm: number; readonly source: string };

/** Reads the options into a plan, or the problems with them (every one, at once). */
function planOf(values: CalibrateValues, plausible: SarcomereRange, problems: string[]): Plan | null {
  const windows = values.window ?? [];
  const lengths = values['sarcomere-length'] ?? [];
  const sds = values.sd ?? [];
  const priorGiven = values['prior-fibre-mm'] !== undefined || values['prior-sarcomere-length'] !== undefined || values['prior-source'] !== undefined || values['prior-fibre-sd-mm'] !== undefined;
  if (priorGiven) {
    if (windows.length > 0 || lengths.length > 0 || sds.length > 0) {
      problems.push('give either postures of the trial (--window with --sarcomere-length) or a prior from published architecture (--prior-…), not both');
      return null;
    }
    let fibreMm: number | undefined;
    let sarcomereUm: number | undefined;
    let fibreSdMm: number | null = null;
    if (values['prior-fibre-mm'] === undefined) problems.push('--prior-fibre-mm MM is required for a prior: the published fibre length, e.g. --prior-fibre-mm 60');
    else {
      const r = parseNumber('--prior-fibre-mm', values['prior-fibre-mm'], 1, 1000, 'a fibre length in mm', '60');
      if (r.ok) fibreMm = r.value;
      else problems.push(r.message);
    }
    if (values['prior-fibre-sd-mm'] !== undefined) {
      const r = parseNumber('--prior-fibre-sd-mm', values['prior-fibre-sd-mm'], 0, 500, 'an SD in mm', '10');
      if (r.ok) fibreSdMm = r.value;
      else problems.push(r.message);
    }
    if (values['prior-sarcomere-length'] === undefined) {
      problems.push('--prior-sarcomere-length UM is required for a prior: the sarcomere length the fibre length is normalised to, e.g. --prior-sarcomere-length 2.7');
    } else {
      const r = parseSarcomereUm('--prior-sarcomere-length', values['prior-sarcomere-length'], plausible);
      if (r.ok) sarcomereUm = r.value;
      else problems.push(r.message);
    }
    const source = values['prior-source'] ?? '';
    if (source.trim() === '') problems.push('--prior-source TEXT is required for a prior: the publication the values come from (authors, year, journal, table)');
    if (fibreMm === undefined || sarcomereUm === undefined || source.trim() === '') return null;
    return { kind: 'prior', fibreMm, fibreSdMm, sarcomereUm, source };
  }
  if (windows.length === 0) problems.push('--window START-END is required: the quiet window in seconds, e.g. --window 1-4');
  if (lengths.length === 0) problems.push('--sarcomere-length UM is required: the sarcomere length in the window’s posture, e.g. --sarcomere-length 2.7');
  if (windows.length > 2) problems.push(`--window was given ${windows.length} times; give one posture, or two for a calibration from two postures`);
  if (windows.length > 0 && lengths.length > 0 && windows.length !== lengths.length) {
    problems.push(
      `--window was given ${windows.length} time${windows.length === 1 ? '' : 's'} and --sarcomere-length ${lengths.length}: give one --sarcomere-length for each --window, in the same order`,
    );
  }
  if (sds.length > 0 && sds.length !== lengths.length) {
    problems.push(`--sd was given ${sds.length} time${sds.length === 1 ? '' : 's'} for ${lengths.length} sarcomere length${lengths.length === 1 ? '' : 's'}: give one --sd for each --sarcomere-length, or none`);
  }
  const parsedWindows: { startS: number; endS: number }[] = [];
  for (const w of windows) {
    const r = parseWindow(w);
    if (r.ok) parsedWindows.push(r.value);
    else problems.push(r.message);
  }
  const parsedLengths: number[] = [];
  for (const l of lengths) {
    const r = parseSarcomereUm('--sarcomere-length', l, plausible);
    if (r.ok) parsedLengths.push(r.value);
    else problems.push(r.message);
  }
  const parsedSds: number[] = [];
  for (const d of sds) {
    const r = parseNumber('--sd', d, 0, 1, "the sarcomere length's SD in µm", '0.1');
    if (r.ok) parsedSds.push(r.value);
    else problems.push(r.message);
  }
  if (parsedLengths.length === 2 && parsedLengths[0] === parsedLengths[1]) {
    problems.push(`the two postures' sarcomere lengths are both ${parsedLengths[0]} µm; two postures need two different sarcomere lengths (or give one posture)`);
  }
  if (problems.length > 0) return null;
  return { kind: 'postures', windows: parsedWindows, sarcomereUm: parsedLengths, sdUm: parsedSds.length > 0 ? parsedSds : null };
}

type CalibrateValues = {
  readonly muscle?: string | undefined;
  readonly window?: string[] | undefined;
  readonly 'sarcomere-length'?: string[] | undefined;
  readonly sd?: string[] | undefined;
  readonly 'sarcomere-source'?: string | undefined;
  readonly 'prior-fibre-mm'?: string | undefined;
  readonly 'prior-fibre-sd-mm'?: string | undefined;
  readonly 'prior-sarcomere-length'?: string | undefined;
  readonly 'prior-source'?: string | undefined;
  readonly species: string;
  readonly settings?: string | undefined;
  readonly mapping?: string | undefined;
  readonly events?: string | undefined;
};

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('calibrate', HELP, argv, {
    muscle: { type: 'string' },
    window: { type: 'string', multiple: true },
    'sarcomere-length': { type: 'string', multiple: true },
    sd: { type: 'string', multiple: true },
    'sarcomere-source': { type: 'string' },
    'prior-fibre-mm': { type: 'string' },
    'prior-fibre-sd-mm': { type: 'string' },
    'prior-sarcomere-length': { type: 'string' },
    'prior-source': { type: 'string' },
    species: { type: 'string', default: DEFAULT_SPECIES },
    ...SETTINGS_OPTION,
    mapping: { type: 'string' },
    events: { type: 'string' },
  }, io);
  if (typeof parsed === 'number') return parsed;
  const { values, positionals } = parsed;

  // The settings first: the plausible range they give is what a sarcomere length option may take.
  const settings = await settingsOption('calibrate', values.settings, io);
  if (!settings.ok) return 2;
  const problems: string[] = [];
  const plan = planOf(values, plausibleSarcomereRange(settings.value), problems);
  const fileNeeded = plan === null || plan.kind === 'postures';
  if (positionals.length > 1 || (fileNeeded && positionals.length !== 1)) {
    problems.push(`give exactly one trial FILE (got ${positionals.length})${fileNeeded ? '' : ', or none for a prior alone'}`);
  }
  if (values.muscle === undefined || values.muscle === '') problems.push('--muscle NAME is required: the muscle to calibrate, as named in the trial');
  const species = values.species;
  if (!isSpecies(species)) problems.push(`--species "${species}" is not known; accepted: ${SPECIES.join(', ')}`);
  const [path] = positionals;
  const muscle = values.muscle;
  if (problems.length > 0 || plan === null || muscle === undefined || !isSpecies(species)) {
    io.err(`${problems.map((p) => `lengthwise calibrate: ${p}`).join('\n')}\n(lengthwise calibrate --help for the usage)`);
    return 2;
  }

  const mapping = await mappingOption('calibrate', values.mapping, io);
  if (!mapping.ok) return 2;
  let trial: TrialSamples | undefined;
  let sha256: string | undefined;
  if (path !== undefined) {
    try {
      [trial, sha256] = await Promise.all([readTrial(path, muscle, mapping.value ?? null, values.events, settings.value.quality_gate), fileDigest(path).then((d) => d.sha256)]);
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
  }
  const provenanceBase = {
    ...(path !== undefined ? { source_file: path } : {}),
    ...(sha256 !== undefined ? { source_sha256: sha256 } : {}),
    ...(values['sarcomere-source'] !== undefined ? { sarcomere_length_source: values['sarcomere-source'] } : {}),
    created_utc: new Date().toISOString(),
    tool_version: toolVersion(),
  };

  let entry: Record<string, unknown>;
  let count: number;
  let offsetMm = 0;
  if (plan.kind === 'prior') {
    count = sarcomereCountFromReference(plan.fibreMm, plan.sarcomereUm);
    entry = {
      species,
      method: 'architecture_prior',
      prior_fibre_mm: plan.fibreMm,
      ...(plan.fibreSdMm !== null ? { prior_fibre_sd_mm: plan.fibreSdMm } : {}),
      prior_sarcomere_um: plan.sarcomereUm,
      prior_source: plan.source,
      provenance: { method: METHOD_LABEL.architecture_prior, ...provenanceBase, sarcomere_lengths_um: [plan.sarcomereUm], sarcomere_length_source: plan.source },
    };
    io.err(
      `${muscle}: ${METHOD_LABEL.architecture_prior}: ${plan.fibreMm} mm at ${plan.sarcomereUm} µm gives ${Math.round(count)} sarcomeres in series (${plan.source}); ` +
        `caution: ${ARCHITECTURE_PRIOR_CAUTION}`,
    );
  } else {
    const samples = trial as TrialSamples;
    const postures: { fascicleMm: number; sarcomereUm: number; sarcomereSdUm?: number }[] = [];
    for (const [k, window] of plan.windows.entries()) {
      const summary = summarizeWindow(samples.tS, samples.fascicleMm, window.startS, window.endS);
      if (summary.count === 0) {
        const { min: first, max: last } = range(samples.tS);
        io.err(
          `lengthwise calibrate: no usable sample of "${muscle}" lies in ${window.startS}–${window.endS} s; ` +
            (samples.tS.length > 0 ? `its samples run from ${first} to ${last} s. Choose a window inside that range.` : 'all its samples are below the quality gate.'),
        );
        return 1;
      }
      const sarcomereUm = plan.sarcomereUm[k] as number;
      const sd = plan.sdUm?.[k];
      postures.push({ fascicleMm: summary.medianMm, sarcomereUm, ...(sd !== undefined ? { sarcomereSdUm: sd } : {}) });
      io.err(
        `${muscle}: median fascicle length ${mm(summary.medianMm)} over ${summary.count} samples in ${window.startS}–${window.endS} s ` +
          `(5th–95th percentile ${mm(summary.p5Mm)}–${mm(summary.p95Mm)}) at ${sarcomereUm} µm gives ${Math.round(sarcomereCountFromReference(summary.medianMm, sarcomereUm))} sarcomeres in series`,
      );
      if (!summary.quiet) {
        io.err(
          `warning: ${muscle}: the window ${window.startS}–${window.endS} s is not quiet — its fascicle length varies by ${(summary.spreadFraction * 100).toFixed(1)}% ` +
            `(5th–95th percentile over the median; a quiet window stays within ${(QUIET_SPREAD_FRACTION * 100).toFixed(0)}%). ` +
            'Choose a stretch where the person stands still with --window, or check the trial.',
        );
      }
      if (summary.count < 10) {
        io.err(`warning: ${muscle}: only ${summary.count} samples in the window ${window.startS}–${window.endS} s; a longer window gives a steadier median`);
      }
    }
    if (samples.skippedLowQuality > 0) {
      io.err(`${muscle}: ${samples.skippedLowQuality} samples below quality ${settings.value.quality_gate} were left out`);
    }
    const windowsS = plan.windows.map((w) => [w.startS, w.endS]);
    const [a, b] = postures;
    if (a !== undefined && b !== undefined) {
      const two = twoPostureCount(a, b);
      if (!(two.count > 0)) {
        io.err(
          `lengthwise calibrate: ${muscle}: the fascicle length goes from ${mm(a.fascicleMm)} to ${mm(b.fascicleMm)} while the sarcomere length goes from ` +
            `${a.sarcomereUm} to ${b.sarcomereUm} µm: the two change in opposite directions (or the fascicle not at all), which gives no sarcomere count. ` +
            'Check that each --sarcomere-length belongs to its --window, in the same order.',
        );
        return 2;
      }
      const problem = spreadProblem({ relativeSd: two.relativeSd, shape: 'length_normal' });
      if (problem !== null) {
        io.err(`lengthwise calibrate: ${muscle}: ${problem} (the two SDs over a change in sarcomere length of ${Math.abs(b.sarcomereUm - a.sarcomereUm).toFixed(2)} µm)`);
        return 2;
      }
      count = Math.round(two.count);
      offsetMm = Math.round(two.offsetMm * 1000) / 1000;
      io.err(
        `${muscle}: two postures: ${mm(b.fascicleMm - a.fascicleMm)} of fascicle over ${(b.sarcomereUm - a.sarcomereUm).toFixed(3)} µm of sarcomere gives ${count} sarcomeres in series ` +
          `(each posture alone: ${Math.round(two.singleCounts[0])} and ${Math.round(two.singleCounts[1])}); constant part of the tracked length ${mm(offsetMm)}`,
      );
      if (two.disagreement > POSTURE_DISAGREEMENT_FRACTION) {
        io.err(
          `warning: ${muscle}: the two postures' own counts disagree by ${(two.disagreement * 100).toFixed(1)}% (more than ${(POSTURE_DISAGREEMENT_FRACTION * 100).toFixed(0)}%): ` +
            `the tracked length holds a constant part of ${mm(offsetMm)} (aponeurosis or tendon in the tracked line, a tracking offset), or a sarcomere length is off. ` +
            'The two-posture count does not depend on that part; check the sarcomere lengths if the part is not plausible.',
        );
      }
      entry = {
        species,
        method: 'sarcomere_count',
        sarcomeres_in_series: count,
        ...(plan.sdUm !== null ? { sarcomeres_in_series_sd: Math.round(count * two.relativeSd), sarcomeres_in_series_sd_from: 'sarcomere_length' } : {}),
        fascicle_offset_mm: offsetMm,
        provenance: { method: 'two postures', ...provenanceBase, windows_s: windowsS, sarcomere_lengths_um: [...plan.sarcomereUm] },
      };
    } else {
      const one = a as (typeof postures)[number];
      count = Math.round(sarcomereCountFromReference(one.fascicleMm, one.sarcomereUm));
      const relativeSd = (one.sarcomereSdUm ?? 0) / one.sarcomereUm;
      const problem = spreadProblem({ relativeSd, shape: 'length_normal' });
      if (problem !== null) {
        io.err(`lengthwise calibrate: ${muscle}: ${problem}`);
        return 2;
      }
      entry = {
        species,
        method: 'sarcomere_count',
        sarcomeres_in_series: count,
        ...(one.sarcomereSdUm !== undefined ? { sarcomeres_in_series_sd: Math.round(count * relativeSd), sarcomeres_in_series_sd_from: 'sarcomere_length' } : {}),
        provenance: { method: 'one posture', ...provenanceBase, windows_s: windowsS, sarcomere_lengths_um: [...plan.sarcomereUm] },
      };
    }
  }

  const calibration = { muscles: { [muscle]: entry } };
  // The printed calibration must read back through the file's own validation.
  const check = parseCalibration(calibration);
  if (!check.ok) {
    io.err(`lengthwise calibrate: the result is not a valid calibration:\n${check.problems.join('\n')}`);
    return 1;
  }
  if (trial !== undefined) {
    const fascicle = range(trial.fascicleMm);
    const fit = checkCalibrationAgainstTrial(muscle, count, fascicle.min, fascicle.max, offsetMm, plausibleSarcomereRange(settings.value));
    if (!fit.ok) io.err(`warning: ${fit.message}`);
  }
  io.out(JSON.stringify(calibration, null, 2));
  return 0;
}
