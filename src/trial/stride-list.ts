/**
 * Completed strides kept for the whole trial, in compact memory: typed-array columns (the stride index,
 * times and region fractions as 64-bit floats; lengths, forces, velocities, gap time and counts as 32-bit
 * floats, about 7 significant digits) instead of one object per stride and phase. A day-long recording has some 150 000 strides; as
 * objects they would cost over a kilobyte each. Each stride is rebuilt as a StrideSummary on request.
 */
import { REGION_KEYS, type RegionKey } from '../model/regions.ts';
import type { RegionProbabilityFigures, SegmentFigures, StrideSummary } from './stride-summary.ts';

/** What readers of a muscle's strides may do: a plain array of StrideSummary satisfies it too. */
export interface StrideListView extends Iterable<StrideSummary> {
  readonly length: number;
  at(index: number): StrideSummary | undefined;
  slice(start?: number, end?: number): StrideSummary[];
}

const CHUNK = 1024;
const REGIONS = REGION_KEYS.length;

// Per segment (stride, stance, swing): these 32-bit columns…
const SEG_F32 = ['slMinUm', 'slMaxUm', 'slMeanUm', 'slP5Um', 'slP95Um', 'excursionUm', 'forceMean', 'forceLvMean', 'forceTendonMean', 'velocityMinMmS', 'velocityMaxMmS', 'gapS', 'sampleCount'] as const;
const SEGMENTS = 3;
const F32_WIDTH = SEG_F32.length * SEGMENTS;
// …and these 64-bit ones: start, end and the region fractions (kept exact, so they still sum to 1).
const SEG_F64 = 2 + REGIONS;
// 64-bit columns of a stride: its index, then each segment's.
const F64_WIDTH = 1 + SEG_F64 * SEGMENTS;

const FLAGGED = 1;
const ESTIMATED = 2;
const HAS_SEGMENTATION = 4;
const HAS_STANCE = 8;
const HAS_SWING = 16;

/** A 32-bit float read back as the shortest decimal it stands for, so outputs show 2.6055, not 2.605499982833862. */
function tidy(x: number): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  // Rounding to 7 significant digits by scaling: the same digits as toPrecision(7), some ten times faster.
  const scale = 10 ** (6 - Math.floor(Math.log10(Math.abs(x))));
  return Math.round(x * scale) / scale;
}

interface Chunk {
  readonly f32: Float32Array;
  readonly f64: Float64Array;
  readonly flags: Uint8Array;
}

type SegmentLike = Pick<SegmentFigures, 'startS' | 'endS' | 'slMinUm' | 'slMaxUm' | 'slMeanUm' | 'regionFraction' | 'forceMean' | 'gapS' | 'sampleCount'> &
  Partial<Omit<SegmentFigures, 'regionProbability'>>;

export class StrideList implements StrideListView {
  private readonly chunks: Chunk[] = [];
  private count = 0;
  /** Region probabilities are kept only for strides that have them (a calibration with uncertainty). */
  private readonly probabilities = new Map<number, readonly [RegionProbabilityFigures | null, RegionProbabilityFigures | null, RegionProbabilityFigures | null]>();

  get length(): number {
    return this.count;
  }

  push(s: StrideSummary): void {
    const at = this.count % CHUNK;
    if (at === 0) this.chunks.push({ f32: new Float32Array(CHUNK * F32_WIDTH), f64: new Float64Array(CHUNK * F64_WIDTH), flags: new Uint8Array(CHUNK) });
    const chunk = this.chunks[this.chunks.length - 1] as Chunk;
    const f64 = at * F64_WIDTH;
    chunk.f64[f64] = s.index;
    let flags = 0;
    if (s.flagged === true) flags |= FLAGGED;
    if (s.segmentation !== undefined) flags |= HAS_SEGMENTATION | (s.segmentation === 'estimated' ? ESTIMATED : 0);
    if (s.stance != null) flags |= HAS_STANCE;
    if (s.swing != null) flags |= HAS_SWING;
    chunk.flags[at] = flags;
    const segments: (SegmentLike | null | undefined)[] = [s, s.stance, s.swing];
    for (let k = 0; k < SEGMENTS; k++) {
      const seg = segments[k];
      if (seg == null) continue;
      const wide = f64 + 1 + k * SEG_F64;
      chunk.f64[wide] = seg.startS;
      chunk.f64[wide + 1] = seg.endS;
      for (let r = 0; r < REGIONS; r++) chunk.f64[wide + 2 + r] = seg.regionFraction[REGION_KEYS[r] as RegionKey];
      const narrow = at * F32_WIDTH + k * SEG_F32.length;
      for (let c = 0; c < SEG_F32.length; c++) chunk.f32[narrow + c] = (seg[SEG_F32[c] as keyof SegmentLike] as number | undefined) ?? Number.NaN;
    }
    const rp = [s.regionProbability ?? null, s.stance?.regionProbability ?? null, s.swing?.regionProbability ?? null] as const;
    if (rp[0] !== null || rp[1] !== null || rp[2] !== null) this.probabilities.set(this.count, rp);
    this.count++;
  }

  at(index: number): StrideSummary | undefined {
    const i = index < 0 ? this.count + index : index;
    if (!(i >= 0 && i < this.count) || !Number.isInteger(i)) return undefined;
    const chunk = this.chunks[Math.floor(i / CHUNK)] as Chunk;
    const at = i % CHUNK;
    const flags = chunk.flags[at] as number;
    const rp = this.probabilities.get(i);
    const f64 = at * F64_WIDTH;
    const segment = (k: number): SegmentFigures => {
      const wide = f64 + 1 + k * SEG_F64;
      const narrow = at * F32_WIDTH + k * SEG_F32.length;
      const value = (c: number): number => tidy(chunk.f32[narrow + c] as number);
      const regionFraction = {} as Record<RegionKey, number>;
      for (let r = 0; r < REGIONS; r++) regionFraction[REGION_KEYS[r] as RegionKey] = chunk.f64[wide + 2 + r] as number;
      return {
        startS: chunk.f64[wide] as number,
        endS: chunk.f64[wide + 1] as number,
        slMinUm: value(0),
        slMaxUm: value(1),
        slMeanUm: value(2),
        slP5Um: value(3),
        slP95Um: value(4),
        excursionUm: value(5),
        regionFraction,
        regionProbability: rp?.[k] ?? null,
        forceMean: value(6),
        forceLvMean: value(7),
        forceTendonMean: value(8),
        velocityMinMmS: value(9),
        velocityMaxMmS: value(10),
        gapS: value(11),
        sampleCount: chunk.f32[narrow + 12] as number,
      };
    };
    const whole = segment(0);
    return {
      index: chunk.f64[f64] as number,
      ...whole,
      flagged: (flags & FLAGGED) !== 0,
      ...((flags & HAS_SEGMENTATION) !== 0 ? { segmentation: (flags & ESTIMATED) !== 0 ? ('estimated' as const) : ('events' as const) } : {}),
      stance: (flags & HAS_STANCE) !== 0 ? segment(1) : null,
      swing: (flags & HAS_SWING) !== 0 ? segment(2) : null,
    };
  }

  slice(start = 0, end = this.count): StrideSummary[] {
    const from = start < 0 ? Math.max(0, this.count + start) : Math.min(start, this.count);
    const to = end < 0 ? Math.max(0, this.count + end) : Math.min(end, this.count);
    const out: StrideSummary[] = [];
    for (let i = from; i < to; i++) out.push(this.at(i) as StrideSummary);
    return out;
  }

  *[Symbol.iterator](): Iterator<StrideSummary> {
    for (let i = 0; i < this.count; i++) yield this.at(i) as StrideSummary;
  }
}
