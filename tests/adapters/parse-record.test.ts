import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EXCERPT_CHARS } from '../../adapters/limits.ts';
import {
  MAX_DEPTH,
  parseJsonText,
  parseMessage,
  parseRecordValue,
  parseRecordValueBySchema,
} from '../../adapters/parse-record.ts';
import type { Frame, Rejection } from '../../src/trial/records.ts';
import type { RejectReason } from '../../src/trial/reasons.ts';
import { itRejectsEach } from './rejection-table.ts';

function rejection(frame: Frame): Rejection {
  if (frame.kind !== 'rejection') throw new Error(`expected a rejection, got ${frame.kind}`);
  return frame;
}

function reasonOf(text: string): RejectReason | null {
  const frame = parseJsonText(text, 1);
  return frame.kind === 'rejection' ? frame.reason : null;
}

describe('parseRecordValue: valid records', () => {
  it('reads a sample with only its required fields, pennation NaN and quality 1', () => {
    const frame = parseRecordValue({ t: 0.01, muscle: 'calf', fascicle_mm: 52.3 }, 4, '');
    expect(frame).toMatchObject({ kind: 'sample', tS: 0.01, muscle: 'calf', fascicleMm: 52.3, quality: 1, line: 4 });
    expect(frame.kind === 'sample' && Number.isNaN(frame.pennationDeg)).toBe(true);
    expect(frame).toMatchObject({ lowQuality: false, region: null, strideIndex: -1 });
  });

  it('reads a sample with every field', () => {
    const frame = parseRecordValue({ t: 1.5, muscle: 'thigh, front', fascicle_mm: 80, pennation_deg: 12.5, quality: 0.4 }, 2, '');
    expect(frame).toMatchObject({ kind: 'sample', tS: 1.5, muscle: 'thigh, front', fascicleMm: 80, pennationDeg: 12.5, quality: 0.4 });
  });

  it('reads an activation (0–1), NaN when there is none, on the quick and the careful path alike', () => {
    expect(parseRecordValue({ t: 1, muscle: 'calf', fascicle_mm: 50, activation: 0.25 }, 1, '')).toMatchObject({ kind: 'sample', activation: 0.25 });
    expect(parseRecordValueBySchema({ t: 1, muscle: 'calf', fascicle_mm: 50, activation: 0.25 }, 1, '')).toMatchObject({ kind: 'sample', activation: 0.25 });
    expect(parseRecordValue({ t: 1, muscle: 'calf', fascicle_mm: 50 }, 1, '')).toMatchObject({ kind: 'sample', activation: Number.NaN });
    expect(rejection(parseRecordValue({ t: 1, muscle: 'calf', fascicle_mm: 50, activation: 1.2 }, 1, ''))).toMatchObject({
      reason: 'out_of_range',
      message: expect.stringMatching(/activation.*must be a number from 0 to 1/),
    });
  });

  it('accepts the edges of the ranges: pennation 0 and 90, quality 0 and 1, negative device time', () => {
    // A pennation angle is the angle between fascicle and aponeurosis, 0–90° by definition (common practice, no source).
    for (const extra of [{ pennation_deg: 0 }, { pennation_deg: 90 }, { quality: 0 }, { quality: 1 }, { t: -3 }]) {
      expect(parseRecordValue({ t: 0, muscle: 'calf', fascicle_mm: 1, ...extra }, 1, '').kind).toBe('sample');
    }
  });

  it('reads gait events and markers', () => {
    expect(parseRecordValue({ t: 2, event: 'foot_strike', side: 'left' }, 3, '')).toEqual({
      kind: 'event',
      tS: 2,
      event: 'foot_strike',
      side: 'left',
      line: 3,
    });
    expect(parseRecordValue({ t: 2.5, event: 'toe_off', side: 'right' }, 3, '')).toMatchObject({ event: 'toe_off', side: 'right' });
    expect(parseRecordValue({ t: 3, marker: 'start of slope' }, 9, '')).toEqual({ kind: 'marker', tS: 3, marker: 'start of slope', line: 9 });
  });

  it('ignores unknown extra keys, so devices may add fields', () => {
    expect(parseRecordValue({ t: 0, muscle: 'calf', fascicle_mm: 50, probe_temp_c: 31 }, 1, '').kind).toBe('sample');
    expect(parseRecordValue({ t: 0, event: 'toe_off', side: 'left', source: 'insole' }, 1, '').kind).toBe('event');
  });

  it('reads a header with every field, calibration included', () => {
    const frame = parseRecordValue(
      {
        format: 'lengthwise-stream',
        version: 1,
        subject: 'S01',
        trial: 'walk-1',
        rate_hz: 100,
        muscles: { calf: { side: 'left' }, thigh: {} },
        calibration: { muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 17500 } } },
      },
      1,
      '',
    );
    expect(frame).toEqual({
      kind: 'header',
      subject: 'S01',
      trial: 'walk-1',
      rateHz: 100,
      muscles: { calf: { side: 'left' }, thigh: {} },
      calibration: { muscles: { calf: { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 17500 } } },
      line: 1,
    });
  });

  it('reads a bare header with no muscles as an empty declaration', () => {
    expect(parseRecordValue({ format: 'lengthwise-stream', version: 1 }, 1, '')).toEqual({ kind: 'header', muscles: {}, line: 1 });
  });
});

describe('parseRecordValue: rejections', () => {
  it('says what failed, what is accepted and how to fix it for a negative fascicle length', () => {
    const r = rejection(parseJsonText('{"t": 0.1, "muscle": "calf", "fascicle_mm": -3}', 12));
    expect(r.reason).toBe('out_of_range');
    expect(r.line).toBe(12);
    expect(r.message).toBe(
      'fascicle_mm is -3: must be a finite number > 0 (millimetres); if your device sends metres, use a device mapping',
    );
    expect(r.excerpt).toBe('{"t": 0.1, "muscle": "calf", "fascicle_mm": -3}');
  });

  itRejectsEach(reasonOf, [
    ['fascicle 0', 'out_of_range', '{"t":0,"muscle":"calf","fascicle_mm":0}'],
    ['fascicle too big to be finite', 'out_of_range', '{"t":0,"muscle":"calf","fascicle_mm":1e400}'],
    ['pennation above 90', 'out_of_range', '{"t":0,"muscle":"calf","fascicle_mm":50,"pennation_deg":95}'],
    ['pennation below 0', 'out_of_range', '{"t":0,"muscle":"calf","fascicle_mm":50,"pennation_deg":-1}'],
    ['quality above 1', 'out_of_range', '{"t":0,"muscle":"calf","fascicle_mm":50,"quality":1.5}'],
    ['quality below 0', 'out_of_range', '{"t":0,"muscle":"calf","fascicle_mm":50,"quality":-0.1}'],
    ['sample time 1e400 (JSON parses it to Infinity)', 'out_of_range', '{"t":1e400,"muscle":"calf","fascicle_mm":50}'],
    ['event time -1e400', 'out_of_range', '{"t":-1e400,"event":"toe_off","side":"left"}'],
    ['marker time 1e400', 'out_of_range', '{"t":1e400,"marker":"m"}'],
    ['header rate 0', 'out_of_range', '{"format":"lengthwise-stream","version":1,"rate_hz":0}'],
    ['a number', 'schema', '42'],
    ['a string', 'schema', '"calf"'],
    ['null', 'schema', 'null'],
    ['an array', 'schema', '[1, 2]'],
    ['an empty object', 'schema', '{}'],
    ['a sample without fascicle_mm', 'schema', '{"t":0,"muscle":"calf"}'],
    ['a sample without t', 'schema', '{"muscle":"calf","fascicle_mm":50}'],
    ['a sample with t as text', 'schema', '{"t":"0.1","muscle":"calf","fascicle_mm":50}'],
    ['a sample with an empty muscle name', 'schema', '{"t":0,"muscle":"","fascicle_mm":50}'],
    ['a sample with fascicle as text', 'schema', '{"t":0,"muscle":"calf","fascicle_mm":"50"}'],
    ['a sample with null pennation', 'schema', '{"t":0,"muscle":"calf","fascicle_mm":50,"pennation_deg":null}'],
    ['an event without side', 'schema', '{"t":0,"event":"toe_off"}'],
    ['an event with side "up"', 'schema', '{"t":0,"event":"toe_off","side":"up"}'],
    ['a marker that is a number', 'schema', '{"t":0,"marker":5}'],
    ['a header of another format', 'schema', '{"format":"other","version":1}'],
    ['a header of version 2', 'schema', '{"format":"lengthwise-stream","version":2}'],
    ['a header with a bad side', 'schema', '{"format":"lengthwise-stream","version":1,"muscles":{"calf":{"side":"up"}}}'],
    ['a header with a bad calibration', 'schema', '{"format":"lengthwise-stream","version":1,"calibration":{"muscles":{"calf":{"method":"guess"}}}}'],
  ]);

  it('names the version it reads when a header has another version', () => {
    expect(rejection(parseJsonText('{"format":"lengthwise-stream","version":2}', 1)).message).toContain('reads version 1');
  });

  it('names the missing field and the accepted shape', () => {
    const r = rejection(parseJsonText('{"t":0,"muscle":"calf"}', 1));
    expect(r.message).toContain('fascicle_mm is missing');
    expect(r.message).toContain('accepted: {"t": SECONDS, "muscle": "NAME", "fascicle_mm": MM');
  });

  it('rejects text that is not JSON as not_json, with an example of a valid line', () => {
    const r = rejection(parseJsonText('time_s,muscle', 3));
    expect(r.reason).toBe('not_json');
    expect(r.message).toContain('{"t": 0.01, "muscle": "calf", "fascicle_mm": 52.3}');
    expect(reasonOf('{"t": 1,')).toBe('not_json');
    expect(reasonOf('')).toBe('not_json');
  });

  it('rejects gait events other than foot_strike and toe_off as unknown_event, suggesting a marker', () => {
    const r = rejection(parseJsonText('{"t":1,"event":"heel_off","side":"left"}', 1));
    expect(r.reason).toBe('unknown_event');
    expect(r.message).toContain('"heel_off"');
    expect(r.message).toContain('marker');
  });

  it.each([
    ['__proto__ at the top', '{"t":0,"marker":"m","__proto__":{"polluted":true}}'],
    ['__proto__ written with an escape', '{"t":0,"marker":"m","\\u005f_proto__":{"polluted":true}}'],
    ['constructor', '{"t":0,"muscle":"calf","fascicle_mm":50,"constructor":{"prototype":{"polluted":true}}}'],
    ['prototype', '{"t":0,"event":"toe_off","side":"left","prototype":1}'],
    ['__proto__ as a muscle name in a header', '{"format":"lengthwise-stream","version":1,"muscles":{"__proto__":{"side":"left"}}}'],
    ['__proto__ deep in a calibration', '{"format":"lengthwise-stream","version":1,"calibration":{"muscles":{"calf":{"__proto__":{}}}}}'],
    ['__proto__ inside an array', '{"t":0,"marker":"m","extra":[{"__proto__":{"polluted":true}}]}'],
  ])('rejects %s as unsafe_key and never pollutes a prototype', (_name, text) => {
    const r = rejection(parseJsonText(text, 1));
    expect(r.reason).toBe('unsafe_key');
    expect(r.message).toContain('rename the key');
    expect(({} as Record<string, unknown>)['polluted']).toBeUndefined();
    expect(Object.prototype).not.toHaveProperty('polluted');
  });

  it('accepts the words constructor and prototype as values: only keys are refused', () => {
    expect(parseJsonText('{"t":0,"marker":"constructor"}', 1).kind).toBe('marker');
    expect(parseJsonText('{"t":0,"muscle":"__proto__","fascicle_mm":50}', 1).kind).toBe('sample');
  });

  it('rejects nesting deeper than the cap as too_deep, and accepts the deepest record of the format', () => {
    const deep = `{"t":0,"marker":"m","x":${'['.repeat(MAX_DEPTH)}1${']'.repeat(MAX_DEPTH)}}`;
    expect(reasonOf(deep)).toBe('too_deep');
    const veryDeep = `{"x":${'{"a":'.repeat(100_000)}1${'}'.repeat(100_000)}}`;
    expect(reasonOf(veryDeep)).toBe('too_deep');
    const atCap = `{"t":0,"marker":"m","x":${'['.repeat(MAX_DEPTH - 1)}1${']'.repeat(MAX_DEPTH - 1)}}`;
    expect(reasonOf(atCap)).toBeNull();
  });

  it('keeps at most the first 200 characters of the input as the excerpt', () => {
    const text = `{"t":0,"muscle":"calf","fascicle_mm":-1,"note":"${'x'.repeat(1000)}"}`;
    const r = rejection(parseJsonText(text, 1));
    expect(r.excerpt).toHaveLength(EXCERPT_CHARS);
    expect(text.startsWith(r.excerpt)).toBe(true);
  });

  it('gives the header muscles an object without a prototype', () => {
    const frame = parseRecordValue({ format: 'lengthwise-stream', version: 1, muscles: { calf: {} } }, 1, '');
    expect(frame.kind === 'header' && Object.getPrototypeOf(frame.muscles)).toBeNull();
  });
});

describe('parseMessage', () => {
  it('reads one record', () => {
    expect(parseMessage('{"t":0,"muscle":"calf","fascicle_mm":50}', 7)).toMatchObject([{ kind: 'sample', line: 7 }]);
  });

  it('reads an array of records, numbering the elements from the first line', () => {
    const frames = parseMessage('[{"t":0,"muscle":"calf","fascicle_mm":50},{"t":0.01,"event":"foot_strike","side":"left"},{"t":1,"marker":"m"}]', 10);
    expect(frames.map((f) => [f.kind, 'line' in f ? f.line : null])).toEqual([
      ['sample', 10],
      ['event', 11],
      ['marker', 12],
    ]);
  });

  it('gives no frames for an empty array', () => {
    expect(parseMessage('[]', 1)).toEqual([]);
  });

  it('rejects each bad element on its own, with that element as the excerpt', () => {
    const frames = parseMessage('[{"t":0,"muscle":"calf","fascicle_mm":-1},{"t":0,"muscle":"calf","fascicle_mm":1},7]', 1);
    expect(frames.map((f) => (f.kind === 'rejection' ? f.reason : f.kind))).toEqual(['out_of_range', 'sample', 'schema']);
    expect(rejection(frames[0] as Frame).excerpt).toBe('{"t":0,"muscle":"calf","fascicle_mm":-1}');
    expect(rejection(frames[2] as Frame).line).toBe(3);
  });

  it('rejects a message that is not JSON as one not_json frame', () => {
    expect(parseMessage('{"t":', 5)).toMatchObject([{ kind: 'rejection', reason: 'not_json', line: 5 }]);
  });

  it('rejects a message over the cap as line_too_long without parsing it', () => {
    const frames = parseMessage(`[${'1,'.repeat(100)}1]`, 2, 100);
    expect(frames).toMatchObject([{ kind: 'rejection', reason: 'line_too_long', line: 2 }]);
    expect(rejection(frames[0] as Frame).excerpt.length).toBeLessThanOrEqual(EXCERPT_CHARS);
  });

  it('rejects unsafe keys inside an array element', () => {
    expect(parseMessage('[{"t":0,"marker":"m","__proto__":{"polluted":1}}]', 1)).toMatchObject([{ reason: 'unsafe_key' }]);
    expect(({} as Record<string, unknown>)['polluted']).toBeUndefined();
  });
});

describe('quick checks agree with the schemas', () => {
  const number = fc.oneof(
    fc.double(),
    fc.integer({ min: -5, max: 200 }),
    fc.constantFrom(0, -0, 1, 90, 90.0001, -1e-9, Infinity, -Infinity, Number.NaN, Number.MAX_VALUE),
  );
  const anyValue = fc.oneof(number, fc.string({ maxLength: 4 }), fc.constant(undefined), fc.constant(null), fc.boolean(), fc.constant({}));
  const maybe = (arb: fc.Arbitrary<unknown>): fc.Arbitrary<unknown> => fc.oneof(arb, anyValue);

  const sampleLike = fc.record(
    {
      t: maybe(number),
      muscle: maybe(fc.string({ maxLength: 6 })),
      fascicle_mm: maybe(number),
      pennation_deg: maybe(number),
      quality: maybe(number),
      extra: anyValue,
    },
    { requiredKeys: [] },
  );
  const eventLike = fc.record(
    {
      t: maybe(number),
      event: maybe(fc.constantFrom('foot_strike', 'toe_off', 'heel_off')),
      side: maybe(fc.constantFrom('left', 'right', 'up')),
      extra: anyValue,
    },
    { requiredKeys: ['event'] },
  );
  const markerLike = fc.record({ t: maybe(number), marker: maybe(fc.string()), extra: anyValue }, { requiredKeys: ['marker'] });

  it('gives the same frame with or without the quick checks, for near-valid records of every kind', () => {
    fc.assert(
      fc.property(fc.oneof(sampleLike, eventLike, markerLike), (value) => {
        expect(parseRecordValue(value, 1, 'x')).toEqual(parseRecordValueBySchema(value, 1, 'x'));
      }),
      { numRuns: 5000 },
    );
  });
});

describe('fuzz: never throws, one frame per input', () => {
  it('gives exactly one frame for any string', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 300 }), (text) => {
        const frame = parseJsonText(text, 1);
        expect(typeof frame.kind).toBe('string');
      }),
      { numRuns: 3000 },
    );
  });

  it('gives exactly one frame for any JSON text, and never pollutes a prototype', () => {
    const keys = fc.constantFrom('t', 'muscle', 'fascicle_mm', 'event', 'side', 'marker', 'format', 'version', 'muscles', '__proto__', 'constructor', 'prototype');
    const value = fc.letrec((tie) => ({
      node: fc.oneof({ depthSize: 'small' }, fc.jsonValue({ maxDepth: 2 }), fc.dictionary(keys, tie('node'), { maxKeys: 4 }), fc.array(tie('node'), { maxLength: 3 })),
    })).node;
    fc.assert(
      fc.property(value, (v) => {
        const text = JSON.stringify(v) ?? 'null';
        expect(parseJsonText(text, 1).kind).toBeTypeOf('string');
        expect(parseMessage(`[${text}]`, 1).length).toBe(1);
      }),
      { numRuns: 2000 },
    );
    expect(({} as Record<string, unknown>)['t']).toBeUndefined();
    expect(Object.keys(Object.prototype)).toEqual([]);
  });

  it('gives exactly one frame for any value given directly', () => {
    fc.assert(
      fc.property(fc.anything({ withNullPrototype: true, withMap: true, withBigInt: true }), (v) => {
        expect(parseRecordValue(v, 1, '').kind).toBeTypeOf('string');
      }),
      { numRuns: 2000 },
    );
  });
});

describe('records with a session log’s receive time (rx)', () => {
  it('reads them as the schema does, the receive time ignored', () => {
    for (const text of [
      '{"t":1.5,"muscle":"calf","fascicle_mm":50.25,"pennation_deg":20,"quality":0.9,"rx":1733090000.123}',
      '{"t":1.5,"event":"foot_strike","side":"left","rx":1733090000.2}',
      '{"t":1.5,"marker":"belt on","rx":1733090000.3}',
    ]) {
      const value: unknown = JSON.parse(text);
      expect(parseRecordValue(value, 7, text)).toEqual(parseRecordValueBySchema(value, 7, text));
      expect(parseRecordValue(value, 7, text).kind).not.toBe('rejection');
    }
  });
});
