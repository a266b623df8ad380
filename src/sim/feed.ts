/**
 * A device's outgoing stream in real time: the generator's records handed out as the device clock
 * passes them, with forward clock jumps applied. Pure bookkeeping; the caller owns timers and sockets.
 */
import { roundTime } from './bad-lines.ts';
import { createTrial, type GaitTrial, type TrialSpec } from './gait-generator.ts';
import { isWireSample, type WireHeader, type WireRecord, type WireSample } from './wire.ts';

export interface Feed {
  readonly trial: GaitTrial;
  readonly header: WireHeader | null;
  /** Records with generator time ≤ trialS, in order, each with the current clock offset added. */
  pull(trialS: number): WireRecord[];
  /** Moves the device clock forward: every later record's time grows by this much (s, > 0). */
  jump(byS: number): void;
  /** Total forward jump so far (s). */
  readonly offsetS: number;
  /** True once the generator has nothing more. */
  readonly ended: boolean;
}

function shifted(r: WireRecord, byS: number): WireRecord {
  return 't' in r ? { ...r, t: roundTime(r.t + byS) } : r;
}

export function createFeed(spec: TrialSpec): Feed {
  const trial = createTrial(spec);
  const items = trial.records({ header: false, badLines: 'none' });
  let pending: WireRecord | null = null;
  let ended = false;
  let offsetS = 0;
  const advance = (): void => {
    for (;;) {
      const next = items.next();
      if (next.done === true) {
        pending = null;
        ended = true;
        return;
      }
      // Bad lines are off for this iteration; everything left is a record with a time.
      if (typeof next.value !== 'string') {
        pending = next.value;
        return;
      }
    }
  };
  advance();
  return {
    trial,
    header: trial.header,
    pull(trialS) {
      const out: WireRecord[] = [];
      while (pending !== null && 't' in pending && pending.t <= trialS) {
        out.push(offsetS === 0 ? pending : shifted(pending, offsetS));
        advance();
      }
      return out;
    },
    jump(byS) {
      if (byS > 0) offsetS += byS;
    },
    get offsetS() {
      return offsetS;
    },
    get ended() {
      return ended;
    },
  };
}

/** The newest sample of a muscle in a batch, or null. */
export function lastSampleOf(batch: readonly WireRecord[], muscle: string): WireSample | null {
  for (let i = batch.length - 1; i >= 0; i--) {
    const r = batch[i] as WireRecord;
    if (isWireSample(r) && r.muscle === muscle) return r;
  }
  return null;
}
