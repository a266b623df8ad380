/**
 * Whether the recordings of a trial description share their time on the joint clock: each must overlap
 * the others by at least one stride, or its clock is not theirs (an offset missing or wrong). A recording
 * that does not is said with the offset that would line its first sample up with the first sample of a
 * recording that does: an estimate that holds when the probes started recording at about the same moment
 * (they are started by hand, a fraction of a second apart), to be checked against the strides it gives.
 */

export interface RecordingSpan {
  readonly file: string;
  /** The description's time_offset_s for it. */
  readonly offsetS: number;
  /** First and last sample times on the joint clock; NaN when not known. */
  readonly firstS: number;
  readonly lastS: number;
}

/** When no events tell a stride's length: a slow walking stride (common practice, no source: walking strides last about 1–1.3 s). */
export const DEFAULT_STRIDE_S = 2;

function known(s: RecordingSpan): boolean {
  return Number.isFinite(s.firstS) && Number.isFinite(s.lastS);
}

/** The time all the recordings share, [latest first sample, earliest last sample]; null when they share none (or one is not known). */
export function sharedSpan(spans: readonly RecordingSpan[]): { readonly firstS: number; readonly lastS: number } | null {
  if (spans.length === 0 || !spans.every(known)) return null;
  const firstS = Math.max(...spans.map((s) => s.firstS));
  const lastS = Math.min(...spans.map((s) => s.lastS));
  return lastS > firstS ? { firstS, lastS } : null;
}

/** Seconds, as the messages write them: to the millisecond. */
function seconds(x: number): string {
  return String(Math.round(x * 1000) / 1000);
}

/** How much of `s` the others' time covers, seconds (negative: the gap between them). */
function overlapS(s: RecordingSpan, others: readonly RecordingSpan[]): number {
  const first = Math.min(...others.map((o) => o.firstS));
  const last = Math.max(...others.map((o) => o.lastS));
  return Math.min(s.lastS, last) - Math.max(s.firstS, first);
}

/**
 * The recordings that overlap the others by less than `strideS`, one sentence each with a suggested
 * offset; empty when every recording overlaps (or fewer than two are known). `strideFrom` says where the
 * stride's length comes from. When no two recordings overlap, the first recording's clock is kept.
 */
export function overlapProblems(spans: readonly RecordingSpan[], strideS: number, strideFrom: string): string[] {
  const usable = spans.filter(known);
  if (usable.length < 2) return [];
  const apart = usable.filter((s) => overlapS(s, usable.filter((o) => o !== s)) < strideS);
  if (apart.length === 0) return [];
  // Apart from one another, all of them: the first recording's clock is the trial's.
  const off = apart.length === usable.length ? usable.slice(1) : apart;
  const reference = usable.find((s) => !off.includes(s)) as RecordingSpan;
  return off.map((s) => {
    const others = usable.filter((o) => o !== s);
    const overlap = overlapS(s, others);
    const first = Math.min(...others.map((o) => o.firstS));
    const last = Math.max(...others.map((o) => o.lastS));
    const suggested = Math.round((s.offsetS + reference.firstS - s.firstS) * 1000) / 1000;
    return (
      `${s.file} spans ${seconds(s.firstS)}–${seconds(s.lastS)} s on the trial's clock and the other recordings ${seconds(first)}–${seconds(last)} s: ` +
      `they overlap by ${overlap > 0 ? `${seconds(overlap)} s` : 'nothing'}, less than one stride (${seconds(strideS)} s, ${strideFrom}), so its clock is not theirs. ` +
      `Lining its first sample up with the first sample of ${reference.file} gives "time_offset_s": ${suggested} in its entry of the description ` +
      `(${s.offsetS === 0 ? 'it gives none' : `it gives ${s.offsetS}`}; an estimate that holds when the probes were started together, give or take a second: check its strides against the other recordings' once it plays)`
    );
  });
}
