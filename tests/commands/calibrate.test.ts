import { captureIo } from '../helpers/capture-io.ts';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { createHash } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseWindow, run } from '../../src/commands/calibrate.ts';
import { parseCalibration } from '../../adapters/calibration-file.ts';


async function calibrate(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  const c = captureIo();
  const code = await run(argv, c.io);
  return { code, out: c.outText(), err: c.errText() };
}

/**
 * An invented trial, 100 Hz: 0–5 s standing (calf 50 mm ± 0.3 mm, shin 70 mm), then 5–15 s walking
 * (calf swinging 42–58 mm). A few samples of poor quality sit inside the standing window.
 */
function trialLines(options: { glitchMm?: number } = {}): string[] {
  const lines = [JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'left' }, shin: {} } })];
  for (let i = 0; i < 1500; i++) {
    const t = i / 100;
    const calf = t < 5 ? 50 + 0.3 * Math.sin(7 * t) : 50 + 8 * Math.sin(2 * Math.PI * t);
    const quality = i % 50 === 7 ? 0.1 : 0.95;
    lines.push(JSON.stringify({ t, muscle: 'calf', fascicle_mm: Number(calf.toFixed(3)), quality }));
    lines.push(JSON.stringify({ t, muscle: 'shin', fascicle_mm: 70 }));
  }
  if (options.glitchMm !== undefined) lines.push(JSON.stringify({ t: 15, muscle: 'calf', fascicle_mm: options.glitchMm }));
  return lines;
}

let dir = '';
let trial = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-calibrate-'));
  trial = join(dir, 'standing-then-walking.ndjson');
  await writeFile(trial, `${trialLines().join('\n')}\n`);
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('lengthwise calibrate', () => {
  it('prints a calibration whose count is the window’s median fascicle length × 1000 / the sarcomere length', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.5');
    expect(r.code).toBe(0);
    const value = JSON.parse(r.out) as { muscles: { calf: { sarcomeres_in_series: number } } };
    // The standing calf oscillates symmetrically about 50 mm: median ≈ 50 mm → 50 × 1000 / 2.5 = 20000.
    expect(Math.abs(value.muscles.calf.sarcomeres_in_series - 20_000)).toBeLessThan(40);
    expect(value).toEqual({
      muscles: {
        calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: value.muscles.calf.sarcomeres_in_series, provenance: expect.any(Object) },
      },
    });
    expect(r.err).toMatch(/calf: median fascicle length 50.\d\d mm over \d+ samples in 1–4 s .* at 2.5 µm gives \d+ sarcomeres in series/);
    expect(r.err).not.toMatch(/warning/);
  });

  it('prints JSON that reads back as a calibration', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7', '--sd', '0.1', '--species', 'frog');
    const back = parseCalibration(JSON.parse(r.out));
    expect(back.ok).toBe(true);
    if (!back.ok) return;
    const cal = back.spec.muscles.calf;
    expect(cal?.species).toBe('frog');
    expect(cal?.method === 'sarcomere_count' && cal.sarcomeresInSeriesSd).toBe(Math.round(((cal?.method === 'sarcomere_count' ? cal.sarcomeresInSeries : 0) * 0.1) / 2.7));
    // The SD lies in the sarcomere length the count came from: the true length is normal around the estimate.
    expect(cal?.method === 'sarcomere_count' && cal.sarcomeresInSeriesSdFrom).toBe('sarcomere_length');
  });

  it('carries its provenance: method, the trial file with its SHA-256, window, sarcomere length and its source, date (UTC), tool version', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7', '--sarcomere-source', 'an invented biopsy');
    const provenance = (JSON.parse(r.out) as { muscles: { calf: { provenance: Record<string, unknown> } } }).muscles.calf.provenance;
    // SHA-256 by Node's own crypto module over the file's bytes.
    const expected = createHash('sha256').update(await readFile(trial)).digest('hex');
    expect(provenance).toEqual({
      method: 'one posture',
      source_file: trial,
      source_sha256: expected,
      sarcomere_length_source: 'an invented biopsy',
      created_utc: expect.stringMatching(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/),
      tool_version: expect.stringMatching(/^lengthwise \d+\.\d+\.\d+$/),
      windows_s: [[1, 4]],
      sarcomere_lengths_um: [2.7],
    });
  });

  it('leaves samples below the quality gate out, and says so', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '0-5', '--sarcomere-length', '2.7');
    expect(r.err).toMatch(/calf: 30 samples below quality 0.2 were left out/);
  });

  it('warns when the window is not quiet', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '6-10', '--sarcomere-length', '2.7');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/warning: calf: the window 6–10 s is not quiet — its fascicle length varies by \d+\.\d% .*Choose a stretch where the person stands still/);
  });

  it('warns when the count puts the trial outside 1–5 µm', async () => {
    const glitchy = join(dir, 'glitch.ndjson');
    await writeFile(glitchy, `${trialLines({ glitchMm: 300 }).join('\n')}\n`);
    const r = await calibrate(glitchy, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/warning: calf: \d+ sarcomeres in series put this trial's fascicle lengths \(\d+\.\d–300.0 mm\) at .* outside the plausible 1–5 µm/);
  });

  it('takes the plausible range of --settings for the sarcomere length it is given', async () => {
    const settings = join(dir, 'narrow.settings.json');
    await writeFile(settings, JSON.stringify({ format: 'lengthwise-settings', version: 1, plausible_sarcomere_min_um: 1.5, plausible_sarcomere_max_um: 4.5 }));
    expect((await calibrate(trial, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '4.8')).code).toBe(0);
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '4.8', '--settings', settings);
    expect(r.code).toBe(2);
    expect(r.err).toContain('--sarcomere-length "4.8" is not accepted; give a sarcomere length from 1.5 to 4.5 µm');
  });

  it('reads the CSV variant too', async () => {
    const csv = join(dir, 'standing.csv');
    const rows = ['time_s,muscle,fascicle_mm,pennation_deg,quality,event,side'];
    for (let i = 0; i < 300; i++) rows.push(`${(i / 100).toFixed(2)},calf,${(60 + 0.2 * Math.sin(i)).toFixed(3)},,,,`);
    await writeFile(csv, `${rows.join('\n')}\n`);
    const r = await calibrate(csv, '--muscle', 'calf', '--window', '0-3', '--sarcomere-length', '3');
    expect(r.code).toBe(0);
    expect(Math.abs((JSON.parse(r.out) as { muscles: { calf: { sarcomeres_in_series: number } } }).muscles.calf.sarcomeres_in_series - 20_000)).toBeLessThan(40);
  });
});

describe('lengthwise calibrate from two postures', () => {
  // Vastus lateralis sarcomere lengths in vivo: 2.84 ± 0.16 µm at 50° and 3.17 ± 0.13 µm at 110° of knee flexion
  // (Chen, Sanchez, Schnitzer & Delp 2016, J Biomech 49:2989–2994, abstract). An invented trial holds the two
  // postures: 30 303 sarcomeres (86.06 and 96.06 mm of fascicle) plus 12 mm of tracked aponeurosis in both.
  let postures = '';
  beforeAll(async () => {
    postures = join(dir, 'two-postures.ndjson');
    const n = 10_000 / 0.33;
    const lines = [JSON.stringify({ format: 'lengthwise-stream', version: 1 })];
    for (let i = 0; i < 1400; i++) {
      const t = i / 100;
      const mmAt = t < 7 ? (n * 2.84) / 1000 + 12 : (n * 3.17) / 1000 + 12;
      lines.push(JSON.stringify({ t, muscle: 'thigh', fascicle_mm: Number((mmAt + 0.1 * Math.sin(9 * t)).toFixed(3)) }));
    }
    await writeFile(postures, `${lines.join('\n')}\n`);
  });

  it('gives N = Δfascicle / Δsarcomere length (10 mm over 0.33 µm: 30 303), the constant part, and each posture’s own count', async () => {
    const r = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--sarcomere-length', '2.84', '--window', '8-12', '--sarcomere-length', '3.17');
    expect(r.code).toBe(0);
    const thigh = (JSON.parse(r.out) as { muscles: { thigh: Record<string, unknown> } }).muscles.thigh;
    expect(Math.abs((thigh.sarcomeres_in_series as number) - 30_303)).toBeLessThanOrEqual(15);
    expect(thigh.fascicle_offset_mm as number).toBeCloseTo(12, 1);
    expect(thigh.provenance).toMatchObject({ method: 'two postures', windows_s: [[1, 5], [8, 12]], sarcomere_lengths_um: [2.84, 3.17] });
    // Alone, each posture takes the 12 mm for sarcomeres: 34 528 and 34 089, 1.3 % apart — under the 5 % warning.
    expect(r.err).toMatch(/each posture alone: 3452\d and 3408\d\); constant part of the tracked length (11\.9\d|12\.0\d) mm/);
    expect(r.err).not.toMatch(/warning/);
    const back = parseCalibration(JSON.parse(r.out));
    expect(back.ok).toBe(true);
  });

  it('warns when the two postures’ own counts disagree by more than 5 %', async () => {
    // Said at 2.5 µm instead of 2.84: the first posture's own count is 13.6 % higher than it would be.
    const r = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--sarcomere-length', '2.5', '--window', '8-12', '--sarcomere-length', '3.17');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/warning: thigh: the two postures' own counts disagree by \d+\.\d% \(more than 5%\)/);
  });

  it('gives N an SD from the two sarcomere lengths’ SDs, and refuses SDs that leave it meaningless', async () => {
    const ok = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--sarcomere-length', '2.84', '--sd', '0.02', '--window', '8-12', '--sarcomere-length', '3.17', '--sd', '0.02');
    expect(ok.code).toBe(0);
    const thigh = (JSON.parse(ok.out) as { muscles: { thigh: Record<string, number | string> } }).muscles.thigh;
    // σ(ΔSL)/ΔSL = √(0.02² + 0.02²)/0.33 = 0.0857.
    expect((thigh.sarcomeres_in_series_sd as number) / (thigh.sarcomeres_in_series as number)).toBeCloseTo(Math.hypot(0.02, 0.02) / 0.33, 3);
    expect(thigh.sarcomeres_in_series_sd_from).toBe('sarcomere_length');
    // The published between-person SDs (0.16 and 0.13 µm) over 0.33 µm: a relative SD of 0.62, refused.
    const refused = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--sarcomere-length', '2.84', '--sd', '0.16', '--window', '8-12', '--sarcomere-length', '3.17', '--sd', '0.13');
    expect(refused.code).toBe(2);
    expect(refused.out).toBe('');
    expect(refused.err).toMatch(/relative SD of 0.62; accepted: 0 to 0.5\. .*not a between-person SD/);
  });

  it('refuses windows and sarcomere lengths that do not pair up, and a second value of a one-value option', async () => {
    const unpaired = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--window', '8-12', '--sarcomere-length', '2.84');
    expect(unpaired.code).toBe(2);
    expect(unpaired.err).toMatch(/--window was given 2 times and --sarcomere-length 1: give one --sarcomere-length for each --window, in the same order/);
    const sds = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--sarcomere-length', '2.84', '--window', '8-12', '--sarcomere-length', '3.17', '--sd', '0.1');
    expect(sds.err).toMatch(/--sd was given 1 time for 2 sarcomere lengths: give one --sd for each --sarcomere-length, or none/);
    const three = await calibrate(postures, '--muscle', 'thigh', '--window', '1-2', '--sarcomere-length', '2.8', '--window', '3-4', '--sarcomere-length', '2.9', '--window', '8-9', '--sarcomere-length', '3.1');
    expect(three.err).toMatch(/--window was given 3 times; give one posture, or two/);
    const twice = await calibrate(postures, '--muscle', 'thigh', '--muscle', 'calf', '--window', '1-5', '--sarcomere-length', '2.84');
    expect(twice.code).toBe(2);
    expect(twice.err).toMatch(/`--muscle` was given 2 times \("thigh", "calf"\); it takes one value: give it once/);
    const same = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--sarcomere-length', '2.84', '--window', '8-12', '--sarcomere-length', '2.84');
    expect(same.err).toMatch(/both 2.84 µm; two postures need two different sarcomere lengths/);
  });

  it('refuses postures whose fascicle and sarcomere lengths change in opposite directions', async () => {
    const r = await calibrate(postures, '--muscle', 'thigh', '--window', '1-5', '--sarcomere-length', '3.17', '--window', '8-12', '--sarcomere-length', '2.84');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/change in opposite directions .* Check that each --sarcomere-length belongs to its --window/);
  });
});

describe('lengthwise calibrate: a prior from published architecture', () => {
  it('prints an architecture_prior calibration, says its caution, and needs no trial', async () => {
    // Invented numbers: a fibre length of 60 ± 12 mm normalised to 2.7 µm.
    const r = await calibrate('--muscle', 'calf', '--prior-fibre-mm', '60', '--prior-fibre-sd-mm', '12', '--prior-sarcomere-length', '2.7', '--prior-source', 'an invented table');
    expect(r.code).toBe(0);
    const calf = (JSON.parse(r.out) as { muscles: { calf: Record<string, unknown> } }).muscles.calf;
    expect(calf).toMatchObject({ method: 'architecture_prior', prior_fibre_mm: 60, prior_fibre_sd_mm: 12, prior_sarcomere_um: 2.7, prior_source: 'an invented table' });
    expect(calf.provenance).toMatchObject({ method: 'prior from published architecture' });
    expect(r.err).toMatch(/calf: prior from published architecture: 60 mm at 2.7 µm gives 22222 sarcomeres in series \(an invented table\); caution: cadaveric fibre length is not the living fascicle length/);
  });

  it('checks the prior against a trial when one is given, and refuses a prior mixed with postures or without its source', async () => {
    const withTrial = await calibrate(trial, '--muscle', 'calf', '--prior-fibre-mm', '5', '--prior-sarcomere-length', '2.7', '--prior-source', 'invented');
    expect(withTrial.err).toMatch(/warning: calf: 1852 sarcomeres in series put this trial's fascicle lengths .* outside the plausible 1–5 µm/);
    const mixed = await calibrate(trial, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7', '--prior-fibre-mm', '60');
    expect(mixed.err).toMatch(/give either postures of the trial .* or a prior from published architecture/);
    const unsourced = await calibrate('--muscle', 'calf', '--prior-fibre-mm', '60', '--prior-sarcomere-length', '2.7');
    expect(unsourced.code).toBe(2);
    expect(unsourced.err).toMatch(/--prior-source TEXT is required for a prior/);
  });
});

describe('lengthwise calibrate: what cannot be done', () => {
  it('names a muscle the trial lacks and the ones it has', async () => {
    const r = await calibrate(trial, '--muscle', 'thigh', '--window', '1-4', '--sarcomere-length', '2.7');
    expect(r.code).toBe(1);
    expect(r.out).toBe('');
    expect(r.err).toBe(`lengthwise calibrate: ${trial} has no samples of muscle "thigh"; it has "calf", "shin". Check --muscle.\n`);
  });

  it('names a window with no samples and the muscle’s time range', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '100-104', '--sarcomere-length', '2.7');
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/no usable sample of "calf" lies in 100–104 s; its samples run from 0 to 14.99 s/);
  });

  it('says when the file cannot be read', async () => {
    const r = await calibrate(join(dir, 'absent.ndjson'), '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7');
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/ENOENT/);
  });

  it('lists every missing or bad option at once', async () => {
    const r = await calibrate('--sarcomere-length', '9', '--species', 'cat', '--sd=-1');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/give exactly one trial FILE \(got 0\)/);
    expect(r.err).toMatch(/--muscle NAME is required/);
    expect(r.err).toMatch(/--window START-END is required/);
    expect(r.err).toMatch(/--sarcomere-length "9" is not accepted; give a sarcomere length from 1 to 5 µm/);
    expect(r.err).toMatch(/--sd "-1" is not accepted/);
    expect(r.err).toMatch(/--species "cat" is not known; accepted: human, frog/);
  });

  it('shows the usage for an unknown option and prints help', async () => {
    expect((await calibrate('--colour')).err).toMatch(/`--colour`: unknown option[\s\S]*lengthwise calibrate --help/);
    const help = await calibrate('--help');
    expect(help.code).toBe(0);
    expect(help.out).toMatch(/^usage: lengthwise calibrate FILE --muscle NAME --window START-END --sarcomere-length UM/);
  });
});

describe('parseWindow', () => {
  it('reads START-END in seconds, negative starts included', () => {
    expect(parseWindow('1-4')).toEqual({ ok: true, value: { startS: 1, endS: 4 } });
    expect(parseWindow(' 10.5 - 13 ')).toEqual({ ok: true, value: { startS: 10.5, endS: 13 } });
    expect(parseWindow('-2-1')).toEqual({ ok: true, value: { startS: -2, endS: 1 } });
  });

  it('refuses a window that ends before it starts, or that is not a window', () => {
    expect(parseWindow('4-1')).toMatchObject({ ok: false, message: expect.stringMatching(/ends before it starts/) });
    expect(parseWindow('1..4')).toMatchObject({ ok: false, message: expect.stringMatching(/is not a window; give START-END/) });
    expect(parseWindow('')).toMatchObject({ ok: false });
  });
});
