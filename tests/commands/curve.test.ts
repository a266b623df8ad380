import { captureIo } from '../helpers/capture-io.ts';
import { describe, expect, it } from 'vitest';
import { parseFilaments, parseSarcomereLengths, run } from '../../src/commands/curve.ts';
import { REGION_KEYS } from '../../src/model/regions.ts';

/** A CommandIo that keeps what the command says; the streams are real PassThrough streams. */

async function curve(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  const c = captureIo();
  const code = await run(argv, c.io);
  return { code, out: c.outText(), err: c.errText() };
}

interface Point {
  sl_um: number;
  force: number;
  region: string;
}

describe('lengthwise curve --sl', () => {
  it('prints force and region at each length: full force on the human plateau (2.64–2.81 µm, the standard model of Gollapudi & Lin 2009, J Biomech 42:2011–2016), none past 4.24 µm', async () => {
    const r = await curve('--sl', '1.2,1.5,2.7,3.525,4.3');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    const rows = r.out.trim().split('\n');
    expect(rows[0]).toMatch(/^# lengthwise curve: human, geometric force, no between-fibre spread; plateau middle \(L0\) 2.726 µm/);
    expect(rows[1]).toBe('sl_um\tforce\tregion');
    const table = rows.slice(2).map((row) => row.split('\t'));
    // Below the steep limb's zero, 1.27 µm (Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457, Fig. 3 — as transcribed).
    expect(table[0]).toEqual(['1.200', '0.0000', 'too_short']);
    expect(table[1]?.[2]).toBe('steep_ascending');
    expect(table[2]).toEqual(['2.700', '1.0000', 'plateau']);
    // Half-way down the straight descending limb from 2.81 to 4.24 µm: half force.
    expect(table[3]?.[2]).toBe('descending');
    expect(Math.abs(Number(table[3]?.[1]) - 0.5)).toBeLessThan(0.005);
    expect(table[4]).toEqual(['4.300', '0.0000', 'no_overlap']);
  });

  it('gives a JSON array of {sl_um, force, region} with --json', async () => {
    const r = await curve('--sl', '2.1', '--species', 'frog', '--json');
    expect(r.code).toBe(0);
    // Frog plateau 2.05–2.2 µm (Gordon, Huxley & Julian 1966, J Physiol 184:170–192, abstract).
    expect(JSON.parse(r.out)).toEqual([{ sl_um: 2.1, force: 1, region: 'plateau' }]);
  });

  it('takes --sl more than once', async () => {
    const r = await curve('--sl', '2.0', '--sl', '3.0', '--json');
    expect((JSON.parse(r.out) as Point[]).map((p) => p.sl_um)).toEqual([2, 3]);
  });

  it('uses the muscle’s own filaments', async () => {
    const r = await curve('--filaments', 'thin=1.1,bare_zone_um=0.2', '--sl', '2.4', '--json');
    expect(JSON.parse(r.out)).toEqual([{ sl_um: 2.4, force: 1, region: 'plateau' }]);
  });

  it('rounds the corner with --between-fibre-sd (or its older name --dispersion) and keeps the region from the geometry', async () => {
    const named = await curve('--between-fibre-sd', '0.21', '--sl', '2.641', '--json');
    const [q] = JSON.parse(named.out) as Point[];
    expect(q?.force).toBeLessThan(1);
    const r = await curve('--dispersion', '0.2', '--sl', '2.641', '--json');
    const [p] = JSON.parse(r.out) as Point[];
    expect(p?.force).toBeLessThan(1);
    expect(p?.region).toBe('plateau');
  });

  it('gives Thelen 2003 (J Biomech Eng 125:70–77) 0.5738 at half L0 with --shape gaussian', async () => {
    const r = await curve('--shape', 'gaussian', '--sl', String(2.726 / 2), '--json');
    const [p] = JSON.parse(r.out) as Point[];
    expect(p?.force).toBeCloseTo(0.5738, 3);
    expect(p?.region).toBe('steep_ascending');
  });
});

describe('lengthwise curve: whole-muscle shapes and activation', () => {
  it('says, with a whole-muscle shape, that its force past the filaments’ overlap is no contradiction', async () => {
    const r = await curve('--shape', 'gaussian', '--sl', '4.3');
    const rows = r.out.trim().split('\n');
    expect(rows[1]).toMatch(/^# note: force from the gaussian shape, a whole-muscle curve: it gives force where the filament geometry gives none/);
    // Thelen 2003 (J Biomech Eng 125:70–77): exp(−(4.3/2.726 − 1)²/0.45) = 0.48 at 4.3 µm, where no filaments overlap.
    const [, force, region] = rows.at(-1)?.split('\t') ?? [];
    expect(Number(force)).toBeCloseTo(Math.exp(-((4.3 / 2.726 - 1) ** 2) / 0.45), 3);
    expect(region).toBe('no_overlap');
    const json = await curve('--shape', 'three-gaussian', '--sl', '4.3', '--json');
    expect(json.err).toMatch(/^note: force from the three-gaussian shape/);
    expect(Array.isArray(JSON.parse(json.out))).toBe(true);
    expect((await curve('--sl', '4.3')).out).not.toMatch(/# note/);
  });

  it('moves the optimum to 3.033 µm at activation 0.25 (L0·(0.15 × 0.75 + 1), Lloyd & Besier 2003, J Biomech 36:765–776 — from memory) and keeps the regions', async () => {
    const r = await curve('--activation', '0.25', '--sl', '2.726,3.033');
    const rows = r.out.trim().split('\n');
    expect(rows[0]).toMatch(/at activation 0.25 the optimum moves to 3.033 µm \(λ 0.15, Lloyd & Besier 2003\)/);
    // The full-activation plateau middle now gives the force the curve had at 2.726/1.1125 = 2.450 µm, on the shallow limb.
    const [atL0, atShifted] = rows.slice(2).map((row) => row.split('\t'));
    expect(Number(atL0?.[1])).toBeLessThan(1);
    expect(atL0?.[2]).toBe('plateau');
    expect(atShifted).toEqual(['3.033', '1.0000', 'descending']);
  });

  it('refuses an activation outside 0–1 and a shift without an activation', async () => {
    expect((await curve('--activation', '1.5', '--sl', '2')).err).toMatch(/--activation "1.5" is not accepted; give an activation from 0 to 1/);
    expect((await curve('--activation-shift', '0.2', '--sl', '2')).err).toMatch(/--activation-shift needs --activation A/);
  });
});

describe('lengthwise curve without --sl', () => {
  it('prints the breakpoints, then a table across the range that includes them', async () => {
    const r = await curve('--species', 'frog');
    expect(r.code).toBe(0);
    const lines = r.out.trim().split('\n');
    // The break "at about 1.67 µm" and the plateau of 2.05–2.2 µm (Gordon, Huxley & Julian 1966, J Physiol 184:170–192,
    // abstract); the force there about 0.8 (their Fig. 12 — from memory).
    const brk = lines.find((l) => l.startsWith('# steep_break\t'))?.split('\t') ?? [];
    expect(Math.abs(Number(brk[1]) - 1.67)).toBeLessThanOrEqual(0.025);
    expect(Math.abs(Number(brk[2]) - 0.8)).toBeLessThanOrEqual(0.03);
    expect(lines).toContain('# plateau_start\t2.050\t1.0000');
    expect(lines).toContain('# plateau_end\t2.200\t1.0000');
    expect(lines).toContain('# descending_zero\t3.650\t0.0000');
    expect(lines).toContain('3.650\t0.0000\tno_overlap');
    const table = lines.filter((l) => !l.startsWith('#')).slice(1);
    expect(table.length).toBeGreaterThan(250);
  });

  it('gives every region in order with --json', async () => {
    const r = await curve('--json', '--step', '0.05');
    const points = JSON.parse(r.out) as Point[];
    const seen = [...new Set(points.map((p) => p.region))];
    expect(seen).toEqual([...REGION_KEYS]);
    expect(points.map((p) => p.sl_um)).toEqual([...points.map((p) => p.sl_um)].sort((a, b) => a - b));
    expect(points.every((p) => p.force >= 0 && p.force <= 1)).toBe(true);
  });
});

describe('lengthwise curve: bad input', () => {
  it('names an unknown species and the accepted ones', async () => {
    const r = await curve('--species', 'cat', '--sl', '2');
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toBe('lengthwise curve: --species "cat" is not known; accepted: human, frog\n');
  });

  it('names an unknown shape, a bad dispersion and a bad length together', async () => {
    const r = await curve('--shape', 'bell', '--dispersion', 'wide', '--sl', '2,abc');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--shape "bell" is not known; accepted: geometric, gaussian, three-gaussian/);
    expect(r.err).toMatch(/--dispersion "wide" is not a number/);
    expect(r.err).toMatch(/--sl: "abc" is not a sarcomere length; give positive numbers in µm/);
  });

  it('refuses a dispersion out of range and filaments that make no curve', async () => {
    expect((await curve('--dispersion', '5', '--sl', '2')).err).toMatch(/between-fibre SD is 5 µm; accepted: 0 \(off\) to 1 µm/);
    expect((await curve('--filaments', 'thick=2.8', '--sl', '2')).err).toMatch(/must be shorter than 2 × thin \+ Z-disc/);
  });

  it('names an unknown option and where the options are listed', async () => {
    const r = await curve('--colour');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/`--colour`: unknown option\n\(lengthwise curve --help lists every option\)/);
    expect((await curve('--spicies', 'frog')).err).toContain('`--spicies`: unknown option; did you mean `--species`?');
  });

  it('prints its help with --help', async () => {
    const r = await curve('--help');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^usage: lengthwise curve \[options\]/);
    expect(r.out).toMatch(/--filaments LIST/);
  });
});

describe('option readers', () => {
  it('read filament lists and name a bad key or value', () => {
    expect(parseFilaments('thick=1.6, thin_um=1.27')).toEqual({ ok: true, value: { thickUm: 1.6, thinUm: 1.27 } });
    expect(parseFilaments('myosin=1.6')).toMatchObject({ ok: false, message: expect.stringMatching(/unknown key "myosin"; accepted keys: thick, thin/) });
    expect(parseFilaments('thick=')).toMatchObject({ ok: false, message: expect.stringMatching(/needs a number/) });
    expect(parseFilaments('toString=1')).toMatchObject({ ok: false });
  });

  it('read length lists and refuse empty, zero or negative ones', () => {
    expect(parseSarcomereLengths('2, 2.5,3')).toEqual({ ok: true, value: [2, 2.5, 3] });
    expect(parseSarcomereLengths('').ok).toBe(false);
    expect(parseSarcomereLengths('0').ok).toBe(false);
    expect(parseSarcomereLengths('-1').ok).toBe(false);
    expect(parseSarcomereLengths('NaN').ok).toBe(false);
  });
});
