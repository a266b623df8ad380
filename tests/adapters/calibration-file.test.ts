import { mkdtemp, rm, writeFile, chmod } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { calibrationForMuscle, parseCalibration, readCalibrationFile } from '../../adapters/calibration-file.ts';

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-cal-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

function problemsOf(value: unknown): readonly string[] {
  const r = parseCalibration(value);
  if (r.ok) throw new Error('expected problems');
  return r.problems;
}

describe('parseCalibration: valid calibrations', () => {
  it('reads the three methods, species defaulting to human', () => {
    const r = parseCalibration({
      muscles: {
        calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: 17500 },
        thigh: { method: 'reference', reference_fascicle_mm: 80, reference_sarcomere_um: 2.7 },
        shin: { species: 'frog', method: 'optimal_length', optimal_fascicle_mm: 12 },
      },
    });
    expect(r).toEqual({
      ok: true,
      spec: {
        muscles: {
          calf: { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 17500 },
          thigh: { species: 'human', method: 'reference', referenceFascicleMm: 80, referenceSarcomereUm: 2.7 },
          shin: { species: 'frog', method: 'optimal_length', optimalFascicleMm: 12 },
        },
      },
    });
  });

  it('reads uncertainty, filaments, dispersion and shape', () => {
    const r = parseCalibration({
      muscles: {
        calf: {
          method: 'reference',
          reference_fascicle_mm: 50,
          reference_sarcomere_um: 2.6,
          reference_sarcomere_sd_um: 0.1,
          reference_fascicle_sd_mm: 2,
          filaments: { thick_um: 1.65, thin_um: 1.2, bare_zone_um: 0.16, z_disc_um: 0.08, steep_zero_um: 1.3, steep_break_force: 0.85 },
          dispersion_sd_um: 0.2,
          shape: 'three-gaussian',
        },
      },
    });
    expect(r.ok && r.spec.muscles.calf).toEqual({
      species: 'human',
      method: 'reference',
      referenceFascicleMm: 50,
      referenceSarcomereUm: 2.6,
      referenceSarcomereSdUm: 0.1,
      referenceFascicleSdMm: 2,
      filaments: { thickUm: 1.65, thinUm: 1.2, bareZoneUm: 0.16, zDiscUm: 0.08, steepZeroUm: 1.3, steepBreakForce: 0.85 },
      dispersionSdUm: 0.2,
      shape: 'three-gaussian',
    });
  });

  it('accepts an empty muscle list', () => {
    expect(parseCalibration({ muscles: {} })).toEqual({ ok: true, spec: { muscles: {} } });
  });

  it('keeps a muscle named like an object property as data', () => {
    const r = parseCalibration({ muscles: { toString: { method: 'sarcomere_count', sarcomeres_in_series: 20000 } } });
    expect(r.ok && Object.keys(r.spec.muscles)).toEqual(['toString']);
  });

  it('keeps a muscle named __proto__ as data, as a file read with JSON.parse gives it, and checks it like any other', () => {
    const r = parseCalibration(JSON.parse('{"muscles": {"__proto__": {"method": "sarcomere_count", "sarcomeres_in_series": 20000}, "calf": {"method": "sarcomere_count", "sarcomeres_in_series": 17500}}}'));
    expect(r.ok && Object.keys(r.spec.muscles)).toEqual(['__proto__', 'calf']);
    expect(r.ok && r.spec.muscles['__proto__']).toMatchObject({ method: 'sarcomere_count', sarcomeresInSeries: 20000 });
    const bad = problemsOf(JSON.parse('{"muscles": {"__proto__": {"method": "sarcomere_count", "sarcomeres_in_series": -3}}}'));
    expect(bad.join('\n')).toMatch(/muscles\.__proto__\.sarcomeres_in_series: too small/);
  });
});

describe('parseCalibration: bad input', () => {
  it('names an unknown species and the accepted ones', () => {
    expect(problemsOf({ muscles: { calf: { species: 'cat', method: 'sarcomere_count', sarcomeres_in_series: 20000 } } })[0]).toBe(
      'muscles.calf.species: unknown species "cat"; accepted: "human", "frog"',
    );
  });

  it('names a negative number, with the accepted range', () => {
    expect(problemsOf({ muscles: { calf: { method: 'reference', reference_fascicle_mm: -50, reference_sarcomere_um: 2.7 } } })[0]).toBe(
      'muscles.calf.reference_fascicle_mm: too small; accepted: a fascicle length in mm from 1 to 1000',
    );
  });

  it('names absurd numbers: a 9 µm reference sarcomere, 10 sarcomeres in series', () => {
    expect(problemsOf({ muscles: { calf: { method: 'reference', reference_fascicle_mm: 50, reference_sarcomere_um: 9 } } })[0]).toMatch(
      /reference_sarcomere_um: too large; accepted: a sarcomere length in µm from 1 to 5/,
    );
    expect(problemsOf({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 10 } } })[0]).toMatch(
      /sarcomeres_in_series: too small/,
    );
  });

  it('names a missing number', () => {
    expect(problemsOf({ muscles: { calf: { method: 'optimal_length' } } })[0]).toMatch(/^muscles.calf.optimal_fascicle_mm: must be a number/);
  });

  it('names NaN-like and non-number values', () => {
    expect(problemsOf({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: '20000' } } })[0]).toMatch(/must be a number/);
  });

  it('names an unknown method', () => {
    expect(problemsOf({ muscles: { calf: { method: 'guess' } } })[0]).toBe(
      'muscles.calf.method: unknown or missing "method"; accepted: "sarcomere_count", "reference", "optimal_length"',
    );
  });

  it('names a missing muscles object', () => {
    expect(problemsOf({ calf: {} })[0]).toMatch(/^muscles: missing or not an object/);
    expect(problemsOf(null)[0]).toMatch(/^\(top level\)/);
  });

  it('names an unknown filament key and an unknown shape', () => {
    const problems = problemsOf({
      muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 20000, filaments: { myosin: 1.6 }, shape: 'bell' } },
    });
    expect(problems.join('\n')).toMatch(/muscles.calf.filaments: unknown key in "filaments"; accepted: thick_um, thin_um/);
    expect(problems.join('\n')).toMatch(/muscles.calf.shape: unknown curve shape "bell"; accepted: "geometric", "gaussian", "three-gaussian"/);
  });

  it('names filament lengths that are each in range but make no curve together', () => {
    expect(
      problemsOf({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 20000, filaments: { thick_um: 2.8 } } } })[0],
    ).toMatch(/^muscles.calf.filaments: thick \+ Z-disc \(2.900 µm\) must be shorter than 2 × thin \+ Z-disc/);
  });

  it('names a dispersion SD out of range', () => {
    expect(
      problemsOf({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 20000, dispersion_sd_um: 3 } } })[0],
    ).toMatch(/dispersion_sd_um: too large; accepted: a sarcomere-length SD in µm/);
  });

  it('ends its list with the accepted shape of the whole file', () => {
    const problems = problemsOf({ muscles: { calf: { method: 'guess' } } });
    expect(problems.at(-1)).toMatch(/^accepted: \{"muscles"/);
  });
});

describe('calibrationForMuscle', () => {
  it('finds a muscle the calibration has', () => {
    const r = parseCalibration({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 20000 } } });
    if (!r.ok) throw new Error('bad fixture');
    expect(calibrationForMuscle(r.spec, 'calf')).toMatchObject({ ok: true, calibration: { sarcomeresInSeries: 20000 } });
  });

  it('names a missing muscle and the ones the calibration has', () => {
    const r = parseCalibration({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 20000 } } });
    if (!r.ok) throw new Error('bad fixture');
    const m = calibrationForMuscle(r.spec, 'claf');
    expect(m).toEqual({
      ok: false,
      problem:
        'the calibration has no muscle "claf"; it has "calf". Add the muscle to "muscles", or check the spelling of its name in the trial and the calibration.',
    });
    expect(calibrationForMuscle(r.spec, 'constructor').ok).toBe(false);
  });
});

describe('readCalibrationFile', () => {
  it('reads a real file', async () => {
    const path = join(dir, 'good.json');
    await writeFile(path, JSON.stringify({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 18000 } } }));
    expect(await readCalibrationFile(path)).toMatchObject({ ok: true, spec: { muscles: { calf: { sarcomeresInSeries: 18000 } } } });
  });

  it('prefixes each problem with the file', async () => {
    const path = join(dir, 'bad-species.json');
    await writeFile(path, JSON.stringify({ muscles: { calf: { species: 'cat', method: 'sarcomere_count', sarcomeres_in_series: 18000 } } }));
    const r = await readCalibrationFile(path);
    expect(r.ok === false && r.problems[0]).toBe(`${path}: muscles.calf.species: unknown species "cat"; accepted: "human", "frog"`);
  });

  it('says when the file is missing', async () => {
    const path = join(dir, 'absent.json');
    const r = await readCalibrationFile(path);
    expect(r.ok === false && r.problems[0]).toBe(`cannot read calibration file ${path} (ENOENT); check the path and its permissions`);
  });

  it('says when the file is not JSON', async () => {
    const path = join(dir, 'broken.json');
    await writeFile(path, '{"muscles": ');
    const r = await readCalibrationFile(path);
    expect(r.ok === false && r.problems[0]).toMatch(new RegExp(`^calibration file ${path} is not valid JSON`));
  });

  it('says when the file cannot be read', async () => {
    if (process.getuid?.() === 0) return; // root reads any file: nothing to check
    const path = join(dir, 'locked.json');
    await writeFile(path, '{}');
    await chmod(path, 0o000);
    const r = await readCalibrationFile(path);
    expect(r.ok === false && r.problems[0]).toMatch(/\(EACCES\)/);
  });
});
