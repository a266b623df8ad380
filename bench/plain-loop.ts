/**
 * The same replay work as the tool, written as one plain loop with no framework: no RxJS, no batches,
 * no records beyond a few numbers per line. It reads the file with a plain fs stream, parses each line
 * (JSON.parse, or split(',')), applies the same validity checks, the same per-muscle time order and gap
 * rule, the same quality gate and the same scalar Kalman update (kalmanjs's arithmetic, inlined), the
 * same velocity, conversion and piecewise force–length evaluation, cuts strides at the foot strikes of
 * each muscle's side, and folds the same time-weighted (zero-order hold) sums into per-stride and trial
 * figures. It is the yardstick the tool's speed is measured against, and its figures must equal the
 * tool's (see figures.ts), or the comparison is not honest.
 *
 * Left out (the tool does these, the loop does not): length histograms and percentiles, stance/swing
 * phases, the gait-cycle curve, force capacity (force–velocity, pennation), region probabilities,
 * rejection messages, CSV quoting, unsafe-key and nesting scans, baseline calibration, notices, and the
 * per-batch state the dashboard reads.
 */
import { createReadStream } from 'node:fs';
import type { BenchFigures, MuscleFigures } from './figures.ts';
import { curveFromGeometry } from '../src/model/geometry.ts';
import { SPECIES_GEOMETRY } from '../src/model/species.ts';

export interface PlainLoopOptions {
  readonly format: 'csv' | 'ndjson';
  /** Sarcomeres in series of each muscle (the calibration). */
  readonly sarcomeresInSeries: Readonly<Record<string, number>>;
  /** @default 0.25 */
  readonly gapS?: number;
  /** @default 0.5 */
  readonly weighBelow?: number;
  /** @default 0.2 */
  readonly skipBelow?: number;
  /** @default 0.25 (mm²) */
  readonly measurementNoiseMm2?: number;
  /** @default 12.5 (mm²/s) */
  readonly processNoiseMm2PerS?: number;
  /** @default 0.1 */
  readonly maxGapFraction?: number;
  /** @default 1048576 */
  readonly maxLineBytes?: number;
}

const PLATEAU = 3;

interface Muscle {
  side: 'left' | 'right' | null;
  n: number;
  lastTS: number;
  // Kalman
  kx: number;
  kcov: number;
  kLastTS: number;
  // velocity
  vTS: number;
  vMm: number;
  // strides and the zero-order hold
  strideIndex: number;
  heldTS: number;
  heldSl: number;
  heldForce: number;
  heldRegion: number;
  startS: number;
  coveredS: number;
  slSeconds: number;
  forceSeconds: number;
  plateauS: number;
  sampleCount: number;
  // trial sums over closed strides
  strides: number;
  flagged: number;
  total: number;
  slSum: number;
  forceSum: number;
  plateauSum: number;
}

function newMuscle(side: 'left' | 'right' | null, n: number): Muscle {
  return {
    side,
    n,
    lastTS: Number.NaN,
    kx: Number.NaN,
    kcov: Number.NaN,
    kLastTS: Number.NaN,
    vTS: Number.NaN,
    vMm: Number.NaN,
    strideIndex: -1,
    heldTS: Number.NaN,
    heldSl: Number.NaN,
    heldForce: Number.NaN,
    heldRegion: -1,
    startS: Number.NaN,
    coveredS: 0,
    slSeconds: 0,
    forceSeconds: 0,
    plateauS: 0,
    sampleCount: 0,
    strides: 0,
    flagged: 0,
    total: 0,
    slSum: 0,
    forceSum: 0,
    plateauSum: 0,
  };
}

/** Runs the plain loop over one file and gives the figures the tool gives. */
export async function plainLoop(path: string, options: PlainLoopOptions): Promise<BenchFigures> {
  const gapS = options.gapS ?? 0.25;
  const weighBelow = options.weighBelow ?? 0.5;
  const skipBelow = options.skipBelow ?? 0.2;
  const mn = options.measurementNoiseMm2 ?? 0.25;
  const pn = options.processNoiseMm2PerS ?? 12.5;
  const maxGapFraction = options.maxGapFraction ?? 0.1;
  const maxLineBytes = options.maxLineBytes ?? 1024 * 1024;
  const csv = options.format === 'csv';
  const c = curveFromGeometry(SPECIES_GEOMETRY.human);
  const z0 = c.steepZeroUm;
  const z1 = c.steepBreakUm;
  const z2 = c.plateauStartUm;
  const z3 = c.plateauEndUm;
  const z4 = c.descendingZeroUm;
  const fb = c.steepBreakForce;

  const muscles = new Map<string, Muscle>();
  let firstStrikeSide: 'left' | 'right' | null = null;
  let received = 0;
  let accepted = 0;
  let rejected = 0;
  let lowQuality = 0;
  // CSV columns
  let tCol = -1;
  let mCol = -1;
  let fCol = -1;
  let pCol = -1;
  let qCol = -1;
  let eCol = -1;
  let sCol = -1;
  let cellCount = 0;

  const muscleOf = (name: string): Muscle => {
    let m = muscles.get(name);
    if (m === undefined) {
      m = newMuscle(firstStrikeSide, options.sarcomeresInSeries[name] ?? Number.NaN);
      muscles.set(name, m);
    }
    return m;
  };

  const credit = (m: Muscle, untilS: number): void => {
    const dtS = untilS - m.heldTS;
    if (m.strideIndex < 0 || !(dtS > 0) || dtS > gapS) return;
    m.coveredS += dtS;
    m.slSeconds += m.heldSl * dtS;
    m.forceSeconds += m.heldForce * dtS;
    if (m.heldRegion === PLATEAU) m.plateauS += dtS;
  };

  const closeStride = (m: Muscle, endS: number): void => {
    m.strides++;
    const covered = m.coveredS;
    const duration = endS - m.startS;
    const gap = Math.max(0, duration - covered);
    if (!(gap <= maxGapFraction * duration) || m.sampleCount === 0) {
      m.flagged++;
      return;
    }
    const w = Math.max(0, endS - m.startS - gap);
    if (w <= 0) return;
    m.total += w;
    m.slSum += (covered > 0 ? m.slSeconds / covered : Number.NaN) * w;
    m.forceSum += (covered > 0 ? m.forceSeconds / covered : Number.NaN) * w;
    m.plateauSum += (covered > 0 ? m.plateauS / covered : 0) * w;
  };

  const footStrike = (tS: number, side: 'left' | 'right'): void => {
    if (firstStrikeSide === null) {
      firstStrikeSide = side;
      for (const m of muscles.values()) if (m.side === null) m.side = side;
    }
    for (const m of muscles.values()) {
      if (m.side !== side) continue;
      if (!Number.isNaN(m.heldTS)) {
        credit(m, tS);
        m.heldTS = tS;
      }
      if (m.strideIndex >= 0) closeStride(m, tS);
      m.strideIndex++;
      m.startS = tS;
      m.coveredS = 0;
      m.slSeconds = 0;
      m.forceSeconds = 0;
      m.plateauS = 0;
      m.sampleCount = 0;
    }
  };

  const sample = (tS: number, name: string, fascicleMm: number, quality: number): void => {
    const m = muscleOf(name);
    const previous = m.lastTS;
    if (!(Number.isNaN(previous) || tS > previous)) {
      rejected++;
      return;
    }
    m.lastTS = tS;
    accepted++;
    if (tS - previous > gapS) {
      m.kx = Number.NaN;
      m.vTS = Number.NaN;
      m.heldTS = Number.NaN;
    }
    if (quality < weighBelow) lowQuality++;
    let smoothMm = Number.NaN;
    if (!(quality < skipBelow)) {
      const q = mn / quality;
      if (Number.isNaN(m.kx)) {
        m.kx = fascicleMm;
        m.kcov = q;
      } else {
        // kalmanjs 1.1 with A = C = 1, B = 0, R = process noise × dt, Q = measurement noise / quality.
        const predCov = m.kcov + pn * (tS - m.kLastTS);
        const k = predCov * (1 / (predCov + q));
        m.kx = m.kx + k * (fascicleMm - m.kx);
        m.kcov = predCov - k * predCov;
      }
      m.kLastTS = tS;
      smoothMm = m.kx;
    }
    if (Number.isNaN(smoothMm)) m.vTS = Number.NaN;
    else {
      // Velocity (mm/s) as the backward difference; not among the compared figures, but work the tool does.
      if (!Number.isNaN(m.vTS)) velocitySink += (smoothMm - m.vMm) / (tS - m.vTS);
      m.vTS = tS;
      m.vMm = smoothMm;
    }
    if (!Number.isNaN(m.heldTS)) credit(m, tS);
    const sl = (smoothMm * 1000) / m.n;
    if (Number.isNaN(sl)) {
      m.heldTS = Number.NaN;
      return;
    }
    let force: number;
    let region: number;
    if (sl <= z0) {
      force = 0;
      region = 0;
    } else if (sl < z1) {
      force = (fb * (sl - z0)) / (z1 - z0);
      region = 1;
    } else if (sl < z2) {
      force = fb + ((1 - fb) * (sl - z1)) / (z2 - z1);
      region = 2;
    } else if (sl <= z3) {
      force = 1;
      region = 3;
    } else if (sl < z4) {
      force = (z4 - sl) / (z4 - z3);
      region = 4;
    } else {
      force = 0;
      region = 5;
    }
    m.heldTS = tS;
    m.heldSl = sl;
    m.heldForce = force;
    m.heldRegion = region;
    if (m.strideIndex >= 0) m.sampleCount++;
  };
  let velocitySink = 0;

  const csvLine = (text: string): void => {
    if (cellCount === 0 || text.startsWith('time_s')) {
      const cells = text.split(',');
      tCol = cells.indexOf('time_s');
      mCol = cells.indexOf('muscle');
      fCol = cells.indexOf('fascicle_mm');
      pCol = cells.indexOf('pennation_deg');
      qCol = cells.indexOf('quality');
      eCol = cells.indexOf('event');
      sCol = cells.indexOf('side');
      cellCount = cells.length;
      return;
    }
    if (text.indexOf('"') >= 0) {
      rejected++;
      return;
    }
    const cells = text.split(',');
    if (cells.length > cellCount) {
      rejected++;
      return;
    }
    const tCell = cells[tCol] ?? '';
    const tS = tCell === '' ? Number.NaN : Number(tCell);
    if (!Number.isFinite(tS)) {
      rejected++;
      return;
    }
    const ev = eCol >= 0 ? (cells[eCol] ?? '') : '';
    const muscle = cells[mCol] ?? '';
    if (ev !== '') {
      const side = cells[sCol] ?? '';
      if (muscle !== '' || (ev !== 'foot_strike' && ev !== 'toe_off') || (side !== 'left' && side !== 'right')) {
        rejected++;
        return;
      }
      if (ev === 'foot_strike') footStrike(tS, side);
      return;
    }
    const fCell = cells[fCol] ?? '';
    const pCell = pCol >= 0 ? (cells[pCol] ?? '') : '';
    const qCell = qCol >= 0 ? (cells[qCol] ?? '') : '';
    const fascicleMm = fCell === '' ? Number.NaN : Number(fCell);
    const pennationDeg = pCell === '' ? 0 : Number(pCell);
    const quality = qCell === '' ? 1 : Number(qCell);
    if (muscle === '' || !(fascicleMm > 0 && fascicleMm < Infinity) || !(pennationDeg >= 0 && pennationDeg <= 90) || !(quality >= 0 && quality <= 1)) {
      rejected++;
      return;
    }
    sample(tS, muscle, fascicleMm, quality);
  };

  const ndjsonLine = (text: string): void => {
    let o: unknown;
    try {
      o = JSON.parse(text);
    } catch {
      rejected++;
      return;
    }
    if (typeof o !== 'object' || o === null || Array.isArray(o)) {
      rejected++;
      return;
    }
    const r = o as Record<string, unknown>;
    const t = r['t'];
    if (r['format'] !== undefined) {
      const declared = r['muscles'];
      if (typeof declared === 'object' && declared !== null) {
        for (const [name, d] of Object.entries(declared as Record<string, { side?: unknown }>)) {
          const m = muscleOf(name);
          if (m.side === null && (d.side === 'left' || d.side === 'right')) m.side = d.side;
        }
      }
      return;
    }
    if (typeof t !== 'number' || !Number.isFinite(t)) {
      rejected++;
      return;
    }
    const ev = r['event'];
    if (ev !== undefined) {
      const side = r['side'];
      if ((ev !== 'foot_strike' && ev !== 'toe_off') || (side !== 'left' && side !== 'right')) {
        rejected++;
        return;
      }
      if (ev === 'foot_strike') footStrike(t, side);
      return;
    }
    if (typeof r['marker'] === 'string') return;
    const muscle = r['muscle'];
    const f = r['fascicle_mm'];
    const p = r['pennation_deg'] ?? 0;
    const q = r['quality'] ?? 1;
    if (
      typeof muscle !== 'string' ||
      muscle === '' ||
      typeof f !== 'number' ||
      !(f > 0 && f < Infinity) ||
      typeof p !== 'number' ||
      !(p >= 0 && p <= 90) ||
      typeof q !== 'number' ||
      !(q >= 0 && q <= 1)
    ) {
      rejected++;
      return;
    }
    sample(t, muscle, f, q);
  };

  const onLine = (text: string): void => {
    const line = text.charCodeAt(text.length - 1) === 13 ? text.slice(0, -1) : text;
    if (line.trim() === '') return;
    received++;
    if (line.length > maxLineBytes) {
      rejected++;
      return;
    }
    if (csv) csvLine(line);
    else ndjsonLine(line);
  };

  let carry = '';
  for await (const chunk of createReadStream(path, { highWaterMark: 256 * 1024 }) as AsyncIterable<Buffer>) {
    const text = carry + chunk.toString('utf8');
    let start = 0;
    for (;;) {
      const nl = text.indexOf('\n', start);
      if (nl < 0) break;
      onLine(text.slice(start, nl));
      start = nl + 1;
    }
    carry = text.slice(start);
  }
  if (carry.length > 0) onLine(carry);

  const out: Record<string, MuscleFigures> = {};
  for (const [name, m] of muscles) {
    out[name] = {
      strides: m.strides,
      flagged: m.flagged,
      slMeanUm: m.total > 0 ? m.slSum / m.total : null,
      forceMean: m.total > 0 ? m.forceSum / m.total : null,
      plateauFraction: m.total > 0 ? m.plateauSum / m.total : 0,
    };
  }
  if (velocitySink === Infinity) out['(never)'] = { strides: 0, flagged: 0, slMeanUm: null, forceMean: null, plateauFraction: 0 };
  return { received, accepted, rejected, lowQuality, muscles: out };
}
