/** A short memory of each muscle's raw fascicle lengths, for capturing a calibration at the current posture. */
import type { Batch } from '../trial/records.ts';
import { MuscleRoster } from '../trial/muscle-roster.ts';

/**
 * Per muscle, the newest samples (time and fascicle length) in a fixed ring: bounded memory at any rate.
 * It reads the input before the pipeline, so it takes the trial's muscles by the pipeline's own rule
 * (a MuscleRoster): no ring for a muscle the trial does not take.
 */
export class RecentFascicles {
  private readonly rings = new Map<string, { tS: Float64Array; mm: Float64Array; next: number; size: number }>();
  private readonly roster = new MuscleRoster();

  /** @param capacity samples kept per muscle; 4096 holds 3 s even at 1 kHz. */
  constructor(private readonly capacity = 4096) {}

  record(batch: Batch): void {
    for (const f of batch) {
      if (f.kind === 'header') this.roster.admitAll(Object.keys(f.muscles));
      if (f.kind !== 'sample' || !this.roster.admit(f.muscle) || f.quality < 0.5) continue;
      let ring = this.rings.get(f.muscle);
      if (ring === undefined) {
        ring = { tS: new Float64Array(this.capacity), mm: new Float64Array(this.capacity), next: 0, size: 0 };
        this.rings.set(f.muscle, ring);
      }
      ring.tS[ring.next] = f.tS;
      ring.mm[ring.next] = f.fascicleMm;
      ring.next = (ring.next + 1) % this.capacity;
      ring.size = Math.min(ring.size + 1, this.capacity);
    }
  }

  /** Fascicle lengths (mm) of the last `windowS` seconds of a muscle's good samples, oldest first. */
  window(muscle: string, windowS: number): number[] {
    const ring = this.rings.get(muscle);
    if (ring === undefined || ring.size === 0) return [];
    const newest = (ring.next - 1 + this.capacity) % this.capacity;
    const untilS = ring.tS[newest] as number;
    const out: number[] = [];
    for (let k = 0; k < ring.size; k++) {
      const i = (newest - k + this.capacity) % this.capacity;
      if (untilS - (ring.tS[i] as number) > windowS) break;
      out.push(ring.mm[i] as number);
    }
    return out.reverse();
  }
}
