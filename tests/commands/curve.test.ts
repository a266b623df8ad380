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
  it('prints force and region at each length (human plateau 2.64–2.81 µm, zero at 4.24 µm: Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457)', async () => {
    const r = await curve('--sl', '1.5,2.7,3.5,4.3');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    const rows = r.out.trim().split('\n');
    expect(rows[0]).toMatch(/^# lengthwise curve: human, geometric force, no dispersion; plateau middle \(L0\) 2.726 µm/);
    expect(rows.slice(1)).toEqual([
      'sl_um\tforce\tregion',
      '1.500\t0.4279\tsteep_ascending',
      '2.700\t1.0000\tplateau',
      '3.500\t0.5182\tdescending',
      '4.300\t0.0000\tno_overlap',
    ]);
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

  it('rounds the corner with --dispersion and keeps the region from the geometry', async () => {
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

describe('lengthwise curve without --sl', () => {
  it('prints the breakpoints, then a table across the range that includes them', async () => {
    const r = await curve('--species', 'frog');
    expect(r.code).toBe(0);
    const lines = r.out.trim().split('\n');
    expect(lines).toContain('# steep_break\t1.650\t0.8000');
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
    expect((await curve('--dispersion', '5', '--sl', '2')).err).toMatch(/dispersion SD is 5 µm; accepted: 0 \(off\) to 1 µm/);
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
