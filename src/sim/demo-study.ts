/**
 * An invented study for demos, tests and the bench: subjects × conditions × trials of treadmill walking
 * from the gait generator, each subject with a sarcomere count and an operating range of its own, the
 * faster condition working at longer sarcomere lengths and a shorter stride. Written as trial files, a
 * calibration file per subject and a manifest (study.csv) whose paths are relative to its folder. The
 * subject codes, ages and speeds are made up; deterministic for a seed (the same bytes on every run).
 */
import { mkdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { calibrationJson, createTrial, type MuscleSpec, type TrialSpec } from './gait-generator.ts';
import { deriveSeed, createPrng } from './prng.ts';
import { scenarioSpec } from './scenarios.ts';
import { csvField, writeCsv, writeNdjson, type WriteResult } from './writers.ts';

/** One condition of the invented study. */
export interface StudyCondition {
  readonly name: string;
  /** Belt speed, carried into the manifest as a covariate. */
  readonly speedMS: number;
  /** Mean stride period (s). */
  readonly strideS: number;
  /** Added to every muscle's operating range (µm): the condition's effect. */
  readonly shiftUm: number;
}

export interface StudySpec {
  readonly seed: number;
  readonly subjects: number;
  readonly conditions: readonly StudyCondition[];
  readonly trialsPerCondition: number;
  readonly durationS: number;
  readonly rateHz: number;
  /** How trial files are written: CSV (sides then come from the manifest) or NDJSON. */
  readonly format: 'csv' | 'ndjson';
  /** Trials the manifest marks exclude=true, with the note that says why. */
  readonly excluded?: readonly { readonly subject: string; readonly trial: string; readonly note: string }[];
}

/** Slow and fast treadmill walking. */
export const WALKING_CONDITIONS: readonly StudyCondition[] = [
  { name: 'slow', speedMS: 0.9, strideS: 1.2, shiftUm: 0 },
  { name: 'fast', speedMS: 1.5, strideS: 1.0, shiftUm: 0.06 },
];

/** The small study bundled in replays/study/: 3 subjects × 2 conditions × 2 trials of 15 s at 50 Hz. */
export const DEMO_STUDY: StudySpec = {
  seed: 20_261_201,
  subjects: 3,
  conditions: WALKING_CONDITIONS,
  trialsPerCondition: 2,
  durationS: 15,
  rateHz: 50,
  format: 'csv',
  excluded: [{ subject: 'SYN-202', trial: 'fast-2', note: 'probe strap loosened after 9 s (invented)' }],
};

/** One trial of the study: who, which condition, its file (relative to the manifest), its generator spec. */
export interface StudyTrial {
  readonly subject: string;
  readonly condition: StudyCondition;
  readonly trial: string;
  readonly file: string;
  readonly calibration: string;
  readonly spec: TrialSpec;
  readonly age: number;
}

function subjectCode(i: number): string {
  return `SYN-${String(201 + i).padStart(3, '0')}`;
}

/** A muscle of one subject: its own sarcomere count and operating range, moved by the condition. */
function subjectMuscle(m: MuscleSpec, countFactor: number, offsetUm: number, shiftUm: number): MuscleSpec {
  return {
    ...m,
    sarcomeresInSeries: Math.round(m.sarcomeresInSeries * countFactor),
    trajectory: { ...m.trajectory, minUm: m.trajectory.minUm + offsetUm + shiftUm / 2, maxUm: m.trajectory.maxUm + offsetUm + shiftUm },
  };
}

/** Every trial of the study, subject by subject, condition by condition. */
export function studyTrials(spec: StudySpec): StudyTrial[] {
  const trials: StudyTrial[] = [];
  const ext = spec.format === 'csv' ? 'csv' : 'ndjson';
  for (let s = 0; s < spec.subjects; s++) {
    const subject = subjectCode(s);
    const rng = createPrng(deriveSeed(spec.seed, s + 1));
    const countFactor = 0.94 + 0.12 * rng.next();
    const offsetUm = 0.08 * rng.gauss();
    const age = 22 + Math.floor(30 * rng.next());
    for (const condition of spec.conditions) {
      for (let k = 1; k <= spec.trialsPerCondition; k++) {
        const trial = `${condition.name}-${k}`;
        const base = scenarioSpec('walk', {
          seed: deriveSeed(spec.seed, 1000 * (s + 1) + 10 * spec.conditions.indexOf(condition) + k),
          rateHz: spec.rateHz,
          durationS: spec.durationS,
          // The calibration comes from the manifest's calibration file, so the header carries none.
          header: { subject, trial, calibrate: [] },
        });
        trials.push({
          subject,
          condition,
          trial,
          file: `trials/${subject}-${trial}.${ext}`,
          calibration: `calibrations/${subject}.json`,
          age,
          spec: {
            ...base,
            strideS: condition.strideS,
            muscles: base.muscles.map((m) => subjectMuscle(m, countFactor, offsetUm, condition.shiftUm)),
            // A marker at the start (NDJSON carries it; the CSV variant has no marker rows).
            markers: [{ atS: 0, text: `belt ${condition.speedMS} m/s` }],
          },
        });
      }
    }
  }
  return trials;
}

/** The manifest's text: a row per trial, the muscles' sides, the covariates (speed, age), exclusions. */
export function studyManifestCsv(trials: readonly StudyTrial[], excluded: StudySpec['excluded'] = []): string {
  const rows = [['subject', 'condition', 'trial', 'file', 'calibration', 'side', 'speed_m_s', 'age', 'exclude', 'note']];
  for (const t of trials) {
    const sides = t.spec.muscles.map((m) => `${m.name}=${m.side}`).join(';');
    const out = excluded.find((e) => e.subject === t.subject && e.trial === t.trial);
    rows.push([t.subject, t.condition.name, t.trial, t.file, t.calibration, sides, String(t.condition.speedMS), String(t.age), out !== undefined ? 'true' : 'false', out?.note ?? '']);
  }
  return `${rows.map((r) => r.map((c) => csvField(c)).join(',')).join('\r\n')}\r\n`;
}

async function writeText(path: string, text: string): Promise<WriteResult> {
  try {
    await writeFile(path, text);
    return { ok: true, path, lines: text.split('\n').length - 1, bytes: Buffer.byteLength(text) };
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
    return { ok: false, path, problem: `cannot write ${path} (${code}); check that its folder is writable` };
  }
}

/** Writes the study into a folder: trials/, calibrations/ and study.csv. */
export async function writeStudy(outDir: string, spec: StudySpec): Promise<WriteResult[]> {
  await mkdir(join(outDir, 'trials'), { recursive: true });
  await mkdir(join(outDir, 'calibrations'), { recursive: true });
  const trials = studyTrials(spec);
  const results: WriteResult[] = [];
  const calibrations = new Map<string, StudyTrial>();
  for (const t of trials) if (!calibrations.has(t.calibration)) calibrations.set(t.calibration, t);
  for (const [file, t] of calibrations) results.push(await writeText(join(outDir, file), `${JSON.stringify(calibrationJson(t.spec), null, 2)}\n`));
  for (const t of trials) {
    const trial = createTrial(t.spec);
    const path = join(outDir, t.file);
    results.push(spec.format === 'csv' ? await writeCsv(trial.records({ badLines: 'csv' }), path) : await writeNdjson(trial.records(), path));
  }
  results.push(await writeText(join(outDir, 'study.csv'), studyManifestCsv(trials, spec.excluded)));
  return results;
}
