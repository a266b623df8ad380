/**
 * A live device that restarts sets its clock back (to zero, mostly). Were its times taken as they come,
 * every later sample would be rejected as going back in time until the clock passed its old maximum.
 * So a connection that begins with a header and then, at its first timed record, is more than
 * CLOCK_RESET_MIN_S earlier than the session has seen from that device is taken for a restarted device:
 * from there on its times are its own plus an offset that continues the session's timeline (its last
 * time, plus the wall-clock time that passed since), and a ClockReset record says so, in the data's own
 * path and in the session log, which keeps the shifted times. A smaller step back is taken for records
 * sent again after a reconnection, and left to be rejected. A file's time going back stays a rejection:
 * only live connections are read through this.
 */
import { makeSample, type ClockReset, type Frame } from '../src/trial/records.ts';
import { MuscleRoster } from '../src/trial/muscle-roster.ts';
import { CLOCK_RESET_MIN_S } from '../src/trial/settings.ts';

/** What the session knows of one connection's clock. */
export interface ConnectionClock {
  /** Nothing timed yet, and the connection began with a header: its first timed record decides. */
  undecided: boolean;
  /** Whether anything arrived yet. */
  started: boolean;
  /** Muscles its header declared. */
  declared: readonly string[];
  /** Added to its times. */
  offsetS: number;
}

export function newConnectionClock(): ConnectionClock {
  return { undecided: false, started: false, declared: [], offsetS: 0 };
}

/** The newest time and its receive time, per muscle or for the session. */
interface Seen {
  tS: number;
  rxMs: number;
}

function timeOf(f: Frame): number | null {
  return f.kind === 'sample' || f.kind === 'event' || f.kind === 'marker' ? f.tS : null;
}

function shifted(f: Frame, offsetS: number): Frame {
  switch (f.kind) {
    case 'sample':
      return makeSample(f.tS + offsetS, f.muscle, f.fascicleMm, f.pennationDeg, f.quality, f.line);
    case 'event':
    case 'marker':
      return { ...f, tS: f.tS + offsetS };
    default:
      return f;
  }
}

/** The least time the restarted clock is put after what was seen last, s. */
const MIN_STEP_S = 0.001;

/** Rounds an offset to the microsecond, so shifted times stay readable. */
function roundOffset(s: number): number {
  return Math.round(s * 1e6) / 1e6;
}

export class DeviceClocks {
  /** The newest time of each muscle the session took (as many as a trial takes). */
  private readonly muscles = new Map<string, Seen>();
  private readonly roster = new MuscleRoster();
  /** The newest time of anything timed (the one peer of a client). */
  private readonly all: Seen = { tS: Number.NaN, rxMs: Number.NaN };

  /**
   * @param onePeer true for a client of one acquisition computer (every muscle is that device's); false
   * for a server of several devices, each known by its muscles.
   */
  constructor(private readonly onePeer: boolean) {}

  /** The frames of one message of a connection, with their times on the session's timeline. */
  take(frames: Frame[], clock: ConnectionClock, rxMs: number, line: number): Frame[] {
    let out: Frame[] | null = null;
    for (let i = 0; i < frames.length; i++) {
      let f = frames[i] as Frame;
      if (!clock.started) {
        clock.started = true;
        if (f.kind === 'header') {
          clock.undecided = true;
          clock.declared = Object.keys(f.muscles);
        }
      }
      const tS = timeOf(f);
      if (tS !== null) {
        if (clock.undecided) {
          const reset = this.decide(f, tS, clock, rxMs, line);
          if (reset !== null) (out ??= frames.slice(0, i)).push(reset);
        }
        if (clock.offsetS !== 0) {
          f = shifted(f, clock.offsetS);
          out ??= frames.slice(0, i);
        }
        this.see(f, rxMs);
      }
      out?.push(f);
    }
    return out ?? frames;
  }

  /** At a connection's first timed record: its ClockReset, when its clock went back; null otherwise. */
  private decide(f: Frame, tS: number, clock: ConnectionClock, rxMs: number, line: number): ClockReset | null {
    const muscles = f.kind === 'sample' && !clock.declared.includes(f.muscle) ? [...clock.declared, f.muscle] : clock.declared;
    let seen: Seen | null = null;
    if (this.onePeer) seen = Number.isNaN(this.all.tS) ? null : this.all;
    else {
      for (const m of muscles) {
        const s = this.muscles.get(m);
        if (s !== undefined && (seen === null || s.tS > seen.tS)) seen = s;
      }
      // An event or marker of a device whose header names no muscle it had: its first sample decides.
      if (seen === null && f.kind !== 'sample') return null;
    }
    clock.undecided = false;
    if (seen === null || !(tS < seen.tS - CLOCK_RESET_MIN_S)) return null;
    // At least a millisecond on, so the first record after the restart never lands on the last one before it.
    const passedS = Math.max(MIN_STEP_S, (rxMs - seen.rxMs) / 1000);
    clock.offsetS = roundOffset(seen.tS + passedS - tS);
    const who = this.onePeer ? 'the device' : `the device of ${muscles.map((m) => JSON.stringify(m)).join(', ')}`;
    return {
      kind: 'clock_reset',
      tS: tS + clock.offsetS,
      offsetS: clock.offsetS,
      muscles: this.onePeer ? null : muscles,
      detail: `${who} began a connection with a header and t=${tS} s, after t=${seen.tS} s`,
      line,
    };
  }

  private see(f: Frame, rxMs: number): void {
    const tS = timeOf(f) as number;
    if (!(tS < this.all.tS)) {
      this.all.tS = tS;
      this.all.rxMs = rxMs;
    }
    if (f.kind !== 'sample' || !this.roster.admit(f.muscle)) return;
    const s = this.muscles.get(f.muscle);
    if (s === undefined) this.muscles.set(f.muscle, { tS, rxMs });
    else if (!(tS < s.tS)) {
      s.tS = tS;
      s.rxMs = rxMs;
    }
  }
}
