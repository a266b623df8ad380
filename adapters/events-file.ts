/**
 * The file given with --events: gait events (and markers) from another system, on its own clock, read
 * through the mapping's "events" block and brought onto the samples' clock.
 *
 * It is read whole before the trial plays, into compact columns (13 bytes an event), and sorted by time:
 * a system's export need not be in time order, and a file with no usable event must fail before anything
 * plays. Reading it whole is bounded by MAX_EVENT_LINES lines (a footswitch at both feet, strikes and
 * toe-offs, makes about 4 a second: the cap is some 70 hours of walking); a longer file is refused.
 * Its rejections are not kept: they go on into the trial's counts as they are read.
 */
import { Observable } from 'rxjs';
import type { Batch, Frame, GaitEventName, Rejection, Side } from '../src/trial/records.ts';
import { nothingUsableMessage, RejectionTally } from '../src/trial/rejection-tally.ts';
import type { DeviceMapping } from './device-mapping.ts';
import { fileSource, SourceFormatError, type FileSourceOptions } from './file-source.ts';
import { markerFrame } from './old-link-marker.ts';

/** Most lines an events file may have. */
export const MAX_EVENT_LINES = 1_000_000;

const EVENT_CODES: readonly (readonly [GaitEventName, Side])[] = [
  ['foot_strike', 'left'],
  ['foot_strike', 'right'],
  ['toe_off', 'left'],
  ['toe_off', 'right'],
];
const MARKER_CODE = EVENT_CODES.length;

/** The events and markers of an events file, in time order (ties in file order). */
export class EventList {
  private tS = new Float64Array(1024);
  private code = new Uint8Array(1024);
  private lines = new Int32Array(1024);
  private readonly markers = new Map<number, string>();
  private order: Uint32Array | null = null;
  /** Records kept. */
  count = 0;
  /** Gait events among them. */
  gaitEvents = 0;

  add(f: Frame): void {
    if (f.kind !== 'event' && f.kind !== 'marker') return;
    if (this.count === this.tS.length) this.grow();
    const i = this.count++;
    this.tS[i] = f.tS;
    this.lines[i] = f.line;
    if (f.kind === 'marker') {
      this.code[i] = MARKER_CODE;
      this.markers.set(i, f.marker);
    } else {
      this.code[i] = EVENT_CODES.findIndex(([e, s]) => e === f.event && s === f.side);
      this.gaitEvents++;
    }
  }

  private grow(): void {
    const n = this.tS.length * 2;
    const tS = new Float64Array(n);
    tS.set(this.tS);
    const code = new Uint8Array(n);
    code.set(this.code);
    const lines = new Int32Array(n);
    lines.set(this.lines);
    this.tS = tS;
    this.code = code;
    this.lines = lines;
  }

  /** Sorts by time, once all are added. */
  sort(): void {
    const order = Uint32Array.from({ length: this.count }, (_, i) => i);
    const tS = this.tS;
    order.sort((a, b) => (tS[a] as number) - (tS[b] as number) || a - b);
    this.order = order;
  }

  /** Time of the k-th record in time order. */
  timeAt(k: number): number {
    return this.tS[this.index(k)] as number;
  }

  /** The k-th record in time order, as a frame. */
  frameAt(k: number): Frame {
    const i = this.index(k);
    const tS = this.tS[i] as number;
    const line = this.lines[i] as number;
    const code = this.code[i] as number;
    if (code === MARKER_CODE) return markerFrame(tS, this.markers.get(i) ?? '', line);
    const [event, side] = EVENT_CODES[code] as readonly [GaitEventName, Side];
    return { kind: 'event', tS, event, side, line };
  }

  private index(k: number): number {
    return this.order === null ? k : (this.order[k] as number);
  }
}

/** A rejection of the events file, said as one: its message names the file. */
function fromEventsFile(r: Rejection, path: string): Rejection {
  return { ...r, message: `events file ${path}: ${r.message}` };
}

/**
 * Reads the events file into `list`, passing its rejections on as batches (named as the events file's);
 * errors with a SourceFormatError when the file has more than MAX_EVENT_LINES lines, or no usable gait event.
 */
export function readEventsFile(path: string, mapping: DeviceMapping | null, list: EventList, options: Pick<FileSourceOptions, 'maxLineBytes' | 'chunkBytes'> = {}): Observable<Batch> {
  return new Observable<Batch>((subscriber) => {
    const tally = new RejectionTally();
    let lines = 0;
    return fileSource(path, { ...options, mapping, role: 'events' }).subscribe({
      next: (batch) => {
        const out: Frame[] = [];
        for (const f of batch) {
          if ('line' in f && f.line > lines) lines = f.line;
          if (f.kind === 'rejection') {
            tally.add(f);
            out.push(fromEventsFile(f, path));
          } else list.add(f);
        }
        if (list.count + tally.total > MAX_EVENT_LINES) {
          subscriber.error(
            new SourceFormatError(
              path,
              lines,
              `the events file has more than ${MAX_EVENT_LINES} records: an events file is read whole (to sort it and check it before the trial plays), ` +
                'and at most that many are held; leave out lines that are not gait events, or split the trial',
            ),
          );
          return;
        }
        if (out.length > 0) subscriber.next(out);
      },
      error: (error: unknown) => subscriber.error(error),
      complete: () => {
        if (list.gaitEvents === 0) {
          const hint = 'check the mapping\'s "events" block (its fields, values and table) against the file: lengthwise inspect FILE --events EVENTS shows how it is read';
          subscriber.error(new SourceFormatError(path, lines, nothingUsableMessage('usable gait event', 'the events file', lines, tally, hint)));
          return;
        }
        list.sort();
        subscriber.complete();
      },
    });
  });
}
