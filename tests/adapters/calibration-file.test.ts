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

/** A calibration file's content that calibrates calf alone. */
function calfOnly(calf: Record<string, unknown>): { muscles: { calf: Record<string, unknown> } } {
  return { muscles: { calf } };
}

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
    const r = parseCalibration(
      calfOnly({
        method: 'reference',
        reference_fascicle_mm: 50,
        reference_sarcomere_um: 2.6,
        reference_sarcomere_sd_um: 0.1,
        reference_fascicle_sd_mm: 2,
        filaments: { thick_um: 1.65, thin_um: 1.2, bare_zone_um: 0.16, z_disc_um: 0.08, steep_zero_um: 1.3, steep_break_force: 0.85 },
        dispersion_sd_um: 0.2,
        shape: 'three-gaussian',
      }),
    );
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

  it('reads a prior from published architecture, a two-posture count with its constant part, activation and provenance', () => {
    const r = parseCalibration({
      muscles: {
        calf: {
          method: 'architecture_prior',
          prior_fibre_mm: 44,
          prior_fibre_sd_mm: 9.9,
          prior_sarcomere_um: 2.7,
          prior_source: 'an invented table',
          between_fibre_sd_um: 0.21,
          activation_shift: 0.15,
          activation: 0.25,
        },
        thigh: {
          method: 'sarcomere_count',
          sarcomeres_in_series: 30_303,
          sarcomeres_in_series_sd: 1200,
          sarcomeres_in_series_sd_from: 'sarcomere_length',
          fascicle_offset_mm: -6.1,
          provenance: { method: 'two postures', source_sha256: 'a'.repeat(64), windows_s: [[1, 4], [10, 13]], sarcomere_lengths_um: [2.84, 3.17] },
        },
      },
    });
    expect(r.ok && r.spec.muscles).toEqual({
      calf: {
        species: 'human',
        method: 'architecture_prior',
        priorFibreMm: 44,
        priorFibreSdMm: 9.9,
        priorSarcomereUm: 2.7,
        priorSource: 'an invented table',
        dispersionSdUm: 0.21,
        activationShift: 0.15,
        activation: 0.25,
      },
      thigh: {
        species: 'human',
        method: 'sarcomere_count',
        sarcomeresInSeries: 30_303,
        sarcomeresInSeriesSd: 1200,
        sarcomeresInSeriesSdFrom: 'sarcomere_length',
        fascicleOffsetMm: -6.1,
        provenance: { method: 'two postures', sourceSha256: 'a'.repeat(64), windowsS: [[1, 4], [10, 13]], sarcomereLengthsUm: [2.84, 3.17] },
      },
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
    expect(problemsOf(calfOnly({ species: 'cat', method: 'sarcomere_count', sarcomeres_in_series: 20000 }))[0]).toBe(
      'muscles.calf.species: unknown species "cat"; accepted: "human", "frog"',
    );
  });

  it('names a negative number, with the accepted range', () => {
    expect(problemsOf(calfOnly({ method: 'reference', reference_fascicle_mm: -50, reference_sarcomere_um: 2.7 }))[0]).toBe(
      'muscles.calf.reference_fascicle_mm: too small; accepted: a fascicle length in mm from 1 to 1000',
    );
  });

  it('names absurd numbers: a 9 µm reference sarcomere, 10 sarcomeres in series', () => {
    expect(problemsOf(calfOnly({ method: 'reference', reference_fascicle_mm: 50, reference_sarcomere_um: 9 }))[0]).toMatch(
      /reference_sarcomere_um: too large; accepted: a sarcomere length in µm from 1 to 5/,
    );
    expect(problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 10 }))[0]).toMatch(
      /sarcomeres_in_series: too small/,
    );
  });

  it('names a missing number', () => {
    expect(problemsOf(calfOnly({ method: 'optimal_length' }))[0]).toMatch(/^muscles.calf.optimal_fascicle_mm: must be a number/);
  });

  it('names NaN-like and non-number values', () => {
    expect(problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: '20000' }))[0]).toMatch(/must be a number/);
  });

  it('names an unknown method', () => {
    expect(problemsOf(calfOnly({ method: 'guess' }))[0]).toBe(
      'muscles.calf.method: unknown or missing "method"; accepted: "sarcomere_count", "reference", "optimal_length", "architecture_prior"',
    );
  });

  it('names a missing muscles object', () => {
    expect(problemsOf({ calf: {} })).toEqual(expect.arrayContaining(['`calf`: unknown key; accepted here: muscles']));
    expect(problemsOf({ calf: {} })[1]).toMatch(/^muscles: missing or not an object/);
    expect(problemsOf(null)[0]).toMatch(/^\(top level\)/);
  });

  it('names an unknown filament key and an unknown shape', () => {
    const problems = problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000, filaments: { myosin: 1.6 }, shape: 'bell' }));
    expect(problems.join('\n')).toMatch(/`muscles.calf.filaments.myosin`: unknown key; accepted here: thick_um, thin_um/);
    expect(problems.join('\n')).toMatch(/muscles.calf.shape: unknown curve shape "bell"; accepted: "geometric", "gaussian", "three-gaussian"/);
  });

  it('refuses a misspelled key with its full path and the nearest accepted key, instead of ignoring it', () => {
    const problems = problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000, sarcomeres_in_series_sdd: 500 }));
    expect(problems[0]).toBe(
      '`muscles.calf.sarcomeres_in_series_sdd`: unknown key; did you mean `muscles.calf.sarcomeres_in_series_sd`?',
    );
    expect(problemsOf({ muscle: {} })[0]).toBe('`muscle`: unknown key; did you mean `muscles`?');
  });

  it("refuses a key of another method's, naming the keys of the method given", () => {
    const problems = problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000, optimal_fascicle_mm: 60 }));
    expect(problems[0]).toMatch(/^`muscles.calf.optimal_fascicle_mm`: unknown key; accepted here: species, filaments, .*sarcomeres_in_series, sarcomeres_in_series_sd\b/);
  });

  it('names filament lengths that are each in range but make no curve together', () => {
    expect(
      problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000, filaments: { thick_um: 2.8 } }))[0],
    ).toMatch(/^muscles.calf.filaments: thick \+ Z-disc \(2.900 µm\) must be shorter than 2 × thin \+ Z-disc/);
  });

  it('names a dispersion SD out of range', () => {
    expect(
      problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000, dispersion_sd_um: 3 }))[0],
    ).toMatch(/dispersion_sd_um: too large; accepted: an SD of sarcomere length between fibres in µm/);
  });

  it('refuses SDs that leave the count with a relative SD above 0.5, saying why', () => {
    // Between-person SDs of two postures' sarcomere lengths (2.84 ± 0.16 and 3.17 ± 0.13 µm, Chen, Sanchez,
    // Schnitzer & Delp 2016, J Biomech 49:2989–2994, abstract) leave their difference 0.33 ± 0.21 µm: 0.62.
    const sd = Math.round(30_303 * (Math.hypot(0.16, 0.13) / 0.33));
    const problems = problemsOf({ muscles: { thigh: { method: 'sarcomere_count', sarcomeres_in_series: 30_303, sarcomeres_in_series_sd: sd } } });
    expect(problems[0]).toMatch(/^muscles.thigh: the stated SDs give the sarcomere count a relative SD of 0.62; accepted: 0 to 0.5\. .*not a between-person SD/);
  });

  it('refuses a between-fibre SD given under both its names with two values', () => {
    const problems = problemsOf(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000, between_fibre_sd_um: 0.2, dispersion_sd_um: 0.1 }));
    expect(problems[0]).toMatch(/"between_fibre_sd_um" \(0.2\) and its older name "dispersion_sd_um" \(0.1\) disagree/);
  });

  it('asks a prior from published architecture for its source', () => {
    const problems = problemsOf(calfOnly({ method: 'architecture_prior', prior_fibre_mm: 44, prior_sarcomere_um: 2.7 }));
    expect(problems[0]).toMatch(/muscles.calf.prior_source: accepted: the publication the values come from/);
  });

  it('ends its list with the accepted shape of the whole file', () => {
    const problems = problemsOf(calfOnly({ method: 'guess' }));
    expect(problems.at(-1)).toMatch(/^accepted: \{"muscles"/);
  });
});

describe('calibrationForMuscle', () => {
  it('finds a muscle the calibration has', () => {
    const r = parseCalibration(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000 }));
    if (!r.ok) throw new Error('bad fixture');
    expect(calibrationForMuscle(r.spec, 'calf')).toMatchObject({ ok: true, calibration: { sarcomeresInSeries: 20000 } });
  });

  it('names a missing muscle and the ones the calibration has', () => {
    const r = parseCalibration(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 20000 }));
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
    await writeFile(path, JSON.stringify(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 18000 })));
    expect(await readCalibrationFile(path)).toMatchObject({ ok: true, spec: { muscles: { calf: { sarcomeresInSeries: 18000 } } } });
  });

  it('prefixes each problem with the file', async () => {
    const path = join(dir, 'bad-species.json');
    await writeFile(path, JSON.stringify(calfOnly({ species: 'cat', method: 'sarcomere_count', sarcomeres_in_series: 18000 })));
    const r = await readCalibrationFile(path);
    expect(r.ok === false && r.problems[0]).toBe(`${path}: muscles.calf.species: unknown species "cat"; accepted: "human", "frog"`);
  });

  it('refuses a file that names a muscle twice, instead of keeping the last silently', async () => {
    const path = join(dir, 'twice.json');
    await writeFile(
      path,
      '{"muscles": {\n  "calf": {"method": "sarcomere_count", "sarcomeres_in_series": 18000},\n' +
        '  "calf": {"method": "sarcomere_count", "sarcomeres_in_series": 21000}\n}}\n',
    );
    const r = await readCalibrationFile(path);
    expect(r.ok === false && r.problems).toEqual([
      `${path}: \`muscles.calf\`: given twice (lines 2 and 3); a key may appear once in its object: keep the one you mean`,
    ]);
  });

  it('reads a file that starts with a UTF-8 byte-order mark', async () => {
    const path = join(dir, 'bom.json');
    await writeFile(path, `\uFEFF${JSON.stringify(calfOnly({ method: 'sarcomere_count', sarcomeres_in_series: 18000 }))}`);
    expect(await readCalibrationFile(path)).toMatchObject({ ok: true, spec: { muscles: { calf: { sarcomeresInSeries: 18000 } } } });
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
