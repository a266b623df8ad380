/**
 * A receiving end for the simulator's tests: reads every WebSocket message as the format says (one
 * record, or a JSON array of records) and sorts what arrives, with the independent rule check.
 */
import { MAX_MESSAGE_CHARS } from '../../adapters/parse-record.ts';
import type { RejectReason } from '../../src/trial/reasons.ts';
import { createClassifier } from './stream-check.ts';

export interface Received {
  messages: number;
  headers: number;
  samples: number;
  events: number;
  markers: number;
  /** Bad messages, by the reason they read as. */
  bad: RejectReason[];
  /** Times of valid samples per muscle, in arrival order. */
  readonly timesByMuscle: Map<string, number[]>;
  closeCodes: number[];
}

export interface Collector {
  readonly received: Received;
  take(text: string): void;
}

export function createCollector(): Collector {
  const check = createClassifier(MAX_MESSAGE_CHARS);
  const received: Received = {
    messages: 0,
    headers: 0,
    samples: 0,
    events: 0,
    markers: 0,
    bad: [],
    timesByMuscle: new Map(),
    closeCodes: [],
  };
  const one = (line: string): void => {
    const kind = check.ndjson(line);
    switch (kind) {
      case 'header':
        received.headers++;
        return;
      case 'sample': {
        received.samples++;
        const r = JSON.parse(line) as { t: number; muscle: string };
        const list = received.timesByMuscle.get(r.muscle) ?? [];
        list.push(r.t);
        received.timesByMuscle.set(r.muscle, list);
        return;
      }
      case 'event':
        received.events++;
        return;
      case 'marker':
        received.markers++;
        return;
      default:
        received.bad.push(kind);
    }
  };
  return {
    received,
    take(text) {
      received.messages++;
      if (text.startsWith('[') && text.length <= MAX_MESSAGE_CHARS) {
        let items: unknown;
        try {
          items = JSON.parse(text);
        } catch {
          items = null;
        }
        if (Array.isArray(items)) {
          for (const item of items) one(JSON.stringify(item));
          return;
        }
      }
      one(text);
    },
  };
}
