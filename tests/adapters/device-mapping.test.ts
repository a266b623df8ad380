import fc from 'fast-check';
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  applyMapping,
  decodeMessage,
  headerJsonOf,
  parseDeviceMapping,
  readDeviceMapping,
  unitHint,
  type DeviceMapping,
} from '../../adapters/device-mapping.ts';
import { Ingest, newPeerTrack } from '../../adapters/websocket-client.ts';
import { makeSample, type Frame } from '../../src/trial/records.ts';
import { REJECT_REASONS } from '../../src/trial/reasons.ts';

const MAPPINGS = join(import.meta.dirname, '..', '..', 'adapters', 'mappings');

async function example(name: string): Promise<DeviceMapping> {
  const result = await readDeviceMapping(join(MAPPINGS, name));
  if (!result.ok) throw new Error(result.problems.join('\n'));
  return result.mapping;
}

function only(frames: Frame[]): Frame {
  expect(frames).toHaveLength(1);
  return frames[0] as Frame;
}

// Unit factors: SI prefixes milli 1e-3, centi 1e-2, micro 1e-6, and 1° = π/180 rad
// (BIPM 2019, The International System of Units, SI Brochure 9th edition; table numbers not at hand).

describe('the example mapping twin-probe-si (metres, radians, microseconds)', () => {
  it('turns the device sample into ours: 0.0523 m is 52.3 mm, π/8 rad is 22.5°, 1 250 000 µs is 1.25 s', async () => {
    const m = await example('twin-probe-si.json');
    const text = JSON.stringify({ ts_us: 1_250_000, site: 'calf', len_m: 0.0523, angle_rad: Math.PI / 8, conf: 0.95 });
    const f = only(decodeMessage(text, 1, m));
    expect(f.kind).toBe('sample');
    if (f.kind !== 'sample') return;
    expect(f.tS).toBeCloseTo(1.25, 12);
    expect(f.muscle).toBe('calf');
    expect(f.fascicleMm).toBeCloseTo(52.3, 10);
    expect(f.pennationDeg).toBeCloseTo(22.5, 10);
    expect(f.quality).toBe(0.95);
  });

  it("turns the device's gait words and marker into ours", async () => {
    const m = await example('twin-probe-si.json');
    const text = JSON.stringify([
      { ts_us: 2_000_000, gait: 'HS', foot: 'L' },
      { ts_us: 2_400_000, gait: 'TO', foot: 'R' },
      { ts_us: 2_500_000, note: 'treadmill at 1.2 m/s' },
      { ts_us: 2_600_000, gait: 'JUMP', foot: 'L' },
    ]);
    const frames = decodeMessage(text, 10, m);
    expect(frames.slice(0, 3)).toEqual([
      { kind: 'event', tS: 2, event: 'foot_strike', side: 'left', line: 10 },
      { kind: 'event', tS: 2.4, event: 'toe_off', side: 'right', line: 11 },
      { kind: 'marker', tS: 2.5, marker: 'treadmill at 1.2 m/s', line: 12 },
    ]);
    expect(frames[3]).toMatchObject({ kind: 'rejection', reason: 'unknown_event', line: 13 });
    // The rejection shows what the device sent, not our rewrite of it.
    expect(frames[3]?.kind === 'rejection' && frames[3].excerpt).toContain('JUMP');
  });
});

describe('the example mapping bench-probe-cm (centimetres, milliseconds, numbered channels, time offset)', () => {
  it('turns channel ch1 at 13 000 ms and 5.23 cm into calf at 0.5 s (offset −12.5 s) and 52.3 mm', async () => {
    const m = await example('bench-probe-cm.json');
    const f = only(decodeMessage(JSON.stringify({ time_ms: 13_000, channel: 'ch1', fl_cm: 5.23, pa: 21, q: 0.8 }), 1, m));
    expect(f).toMatchObject({ kind: 'sample', muscle: 'calf', pennationDeg: 21, quality: 0.8 });
    expect(f.kind === 'sample' && f.tS).toBeCloseTo(0.5, 12);
    expect(f.kind === 'sample' && f.fascicleMm).toBeCloseTo(52.3, 10);
  });

  it('keeps a channel it has no name for, and rejects a device value of the wrong type like a native one', async () => {
    const m = await example('bench-probe-cm.json');
    const frames = decodeMessage(JSON.stringify([{ time_ms: 1, channel: 'ch9', fl_cm: 5 }, { time_ms: 'x', channel: 'ch1', fl_cm: 5 }]), 1, m);
    expect(frames[0]).toMatchObject({ kind: 'sample', muscle: 'ch9' });
    expect(frames[1]).toMatchObject({ kind: 'rejection', reason: 'schema' });
  });
});

describe('parseDeviceMapping', () => {
  it('reads the empty mapping as our own names and units', () => {
    const r = parseDeviceMapping({ format: 'lengthwise-mapping', version: 1 });
    expect(r.ok && r.mapping).toMatchObject({ lengthUnit: 'mm', angleUnit: 'deg', timeUnit: 's', timeOffsetS: 0, fields: { fascicle: 'fascicle_mm' } });
  });

  it('maps a device field to the activation of a sample', () => {
    const r = parseDeviceMapping({ format: 'lengthwise-mapping', version: 1, fields: { activation: 'emg_env' } });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(applyMapping({ t: 1, muscle: 'calf', fascicle_mm: 50, emg_env: 0.3 }, r.mapping)).toEqual({ t: 1, muscle: 'calf', fascicle_mm: 50, activation: 0.3 });
  });

  it.each([
    [{ format: 'lengthwise-mapping', version: 1, units: { length: 'inch' } }, /units\.length: accepted: "m", "cm" or "mm"/],
    [{ format: 'lengthwise-mapping', version: 2 }, /version: must be 1/],
    [{ format: 'other', version: 1 }, /format: must be "lengthwise-mapping"/],
    [{ format: 'lengthwise-mapping', version: 1, fields: { speed: 'v' } }, /`fields.speed`: unknown key; accepted here: t, muscle, fascicle/],
    [{ format: 'lengthwise-mapping', version: 1, code: 'x => x' }, /`code`: unknown key; accepted here: format, version/],
    [{ format: 'lengthwise-mapping', version: 1, table: { delimter: ';' } }, /`table.delimter`: unknown key; did you mean `table.delimiter`\?/],
    [{ format: 'lengthwise-mapping', version: 1, muscles: { calf: { fasicle: 'LG' } } }, /`muscles.calf.fasicle`: unknown key; did you mean `muscles.calf.fascicle`\?/],
    [{ format: 'lengthwise-mapping', version: 1, events: { fields: { evnt: 'kind' } } }, /`events.fields.evnt`: unknown key; did you mean `events.fields.event`\?/],
    [{ format: 'lengthwise-mapping', version: 1, table: { delimiter: ':' } }, /table.delimiter: accepted: ",", ";"/],
    [{ format: 'lengthwise-mapping', version: 1, muscles: { a: { fascicle: 'A' }, b: { side: 'left' } } }, /muscles.b: names no "fascicle" column, but other muscles do/],
    [{ format: 'lengthwise-mapping', version: 1, fields: { fascicle: 'F' }, muscles: { a: { fascicle: 'A' } } }, /fields.fascicle: a table with a column per muscle/],
    [{ format: 'lengthwise-mapping', version: 1, muscles: { a: { pennation: 'P' } } }, /muscles.a.pennation: names a column, but the muscle names no "fascicle" column/],
    [{ format: 'lengthwise-mapping', version: 1, muscles: { a: { fascicle: 'X' }, b: { fascicle: 'X' } } }, /muscles.a.fascicle and muscles.b.fascicle both read the device field "X"/],
    [{ format: 'lengthwise-mapping', version: 1, time_offset_s: 'soon' }, /time_offset_s: must be a number/],
    [{ format: 'lengthwise-mapping', version: 1, fields: { t: 'a', fascicle: 'a' } }, /"t" and "fascicle" both read the device field "a"/],
  ])('refuses %j with a message saying what is accepted', (value, message) => {
    const r = parseDeviceMapping(value);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.join('\n')).toMatch(message);
  });

  it('reports a missing file and a file that is not JSON, never throws', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-mapping-'));
    const missing = await readDeviceMapping(join(dir, 'none.json'));
    expect(!missing.ok && missing.problems[0]).toMatch(/cannot read mapping file .*ENOENT/);
    await writeFile(join(dir, 'bad.json'), '{"format": ');
    const bad = await readDeviceMapping(join(dir, 'bad.json'));
    expect(!bad.ok && bad.problems[0]).toMatch(/is not valid JSON/);
  });
});

describe('applyMapping', () => {
  it('passes unmapped keys through, so unsafe keys and deep nesting are still refused', async () => {
    const m = await example('twin-probe-si.json');
    const unsafe = decodeMessage('{"ts_us": 1, "site": "calf", "len_m": 0.05, "__proto__": {"polluted": true}}', 1, m);
    expect(only(unsafe)).toMatchObject({ kind: 'rejection', reason: 'unsafe_key' });
    expect(({} as Record<string, unknown>)['polluted']).toBeUndefined();
    const deep = decodeMessage(`{"ts_us": 1, "site": "calf", "len_m": 0.05, "x": ${'['.repeat(12)}${']'.repeat(12)}}`, 1, m);
    expect(only(deep)).toMatchObject({ kind: 'rejection', reason: 'too_deep' });
  });

  it('leaves a value that is not an object as it is', async () => {
    const m = await example('twin-probe-si.json');
    expect(applyMapping(3, m)).toBe(3);
    expect(applyMapping(null, m)).toBeNull();
    expect(only(decodeMessage('"text"', 1, m))).toMatchObject({ kind: 'rejection', reason: 'schema' });
  });

  it('never lets a device key of our own name override a mapped one', async () => {
    const m = await example('twin-probe-si.json');
    const f = only(decodeMessage('{"ts_us": 1000000, "site": "calf", "len_m": 0.05, "fascicle_mm": 999}', 1, m));
    expect(f.kind === 'sample' && f.fascicleMm).toBeCloseTo(50, 10);
  });
});

describe('decodeMessage', () => {
  it('gives no frames for an empty array, one per element otherwise', () => {
    expect(decodeMessage('[]', 1)).toEqual([]);
    expect(decodeMessage('[{"t": 1, "marker": "a"}, {"t": 2, "marker": "b"}, 3]', 5).map((f) => (f.kind === 'gap' || f.kind === 'calibration' || f.kind === 'stride' || f.kind === 'notice' ? -1 : f.line))).toEqual([5, 6, 7]);
  });

  it('keeps each header as received, calibration included, for the session log', () => {
    const header = { format: 'lengthwise-stream', version: 1, calibration: { muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 17500 } } } };
    const [f] = decodeMessage(JSON.stringify([header]), 1);
    expect(f?.kind).toBe('header');
    expect(JSON.parse(headerJsonOf(f as Frame) ?? 'null')).toEqual(header);
  });

  it('turns any text into frames or rejections, never a throw (fuzzed)', () => {
    fc.assert(
      fc.property(fc.oneof(fc.string(), fc.json(), fc.string({ unit: 'binary' }), fc.constantFrom('NaN', 'Infinity', '-Infinity', '[', '{"__proto__":1}')), (text) => {
        for (const mapping of [null, parseDeviceMapping({ format: 'lengthwise-mapping', version: 1, units: { length: 'm' } })]) {
          const m = mapping === null ? null : mapping.ok ? mapping.mapping : null;
          const frames = decodeMessage(text, 1, m);
          for (const f of frames) {
            expect(['sample', 'event', 'marker', 'header', 'rejection']).toContain(f.kind);
            if (f.kind === 'rejection') expect(REJECT_REASONS).toContain(f.reason);
          }
        }
      }),
      { numRuns: 500 },
    );
  });

  it('turns any bytes of a message into frames or rejections, never a throw (fuzzed)', () => {
    const ingest = new Ingest({ maxMessageBytes: 64 });
    const peer = newPeerTrack();
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 100 }), (bytes) => {
        const frames = ingest.message(Buffer.from(bytes), peer);
        expect(frames.length).toBeGreaterThanOrEqual(bytes.length > 64 ? 1 : 0);
        if (bytes.length > 64) expect(frames).toMatchObject([{ kind: 'rejection', reason: 'line_too_long' }]);
      }),
      { numRuns: 500 },
    );
  });
});

describe('unitHint', () => {
  it('says that a fascicle length of 0.05 looks like metres and names the mapping', () => {
    // Human fascicles are tens of millimetres long, none under 1 mm (common practice, no source).
    const hint = unitHint(makeSample(0, 'calf', 0.05, Number.NaN, 1, 1), null);
    expect(hint).toMatch(/0\.05 mm looks like metres/);
    expect(hint).toMatch(/--mapping FILE/);
    expect(hint).toMatch(/"length": "m"/);
  });

  it('says nothing about lengths in millimetres', () => {
    expect(unitHint(makeSample(0, 'calf', 52.3, Number.NaN, 1, 1), null)).toBeNull();
    expect(unitHint(makeSample(0, 'calf', 1, Number.NaN, 1, 1), null)).toBeNull();
  });
});
