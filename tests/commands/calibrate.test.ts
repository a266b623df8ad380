import { captureIo } from '../helpers/capture-io.ts';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
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
    expect(value).toEqual({ muscles: { calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: value.muscles.calf.sarcomeres_in_series } } });
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
  });

  it('leaves samples below the quality gate out, and says so', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '0-5', '--sarcomere-length', '2.7');
    expect(r.err).toMatch(/calf: 30 samples below quality 0.2 were left out/);
  });

  it('warns when the window is not quiet', async () => {
    const r = await calibrate(trial, '--muscle', 'calf', '--window', '6-10', '--sarcomere-length', '2.7');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/warning: calf: the window is not quiet — its fascicle length varies by \d+\.\d% .*Choose a stretch where the person stands still/);
  });

  it('warns when the count puts the trial outside 1–5 µm', async () => {
    const glitchy = join(dir, 'glitch.ndjson');
    await writeFile(glitchy, `${trialLines({ glitchMm: 300 }).join('\n')}\n`);
    const r = await calibrate(glitchy, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7');
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/warning: calf: \d+ sarcomeres in series put this trial's fascicle lengths \(\d+\.\d–300.0 mm\) at .* outside the plausible 1–5 µm/);
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
