import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseDeviceMapping, type DeviceMapping } from '../../adapters/device-mapping.ts';
import { createMappedNdjsonReader } from '../../adapters/mapped-ndjson.ts';

function mapping(name: string): DeviceMapping {
  const result = parseDeviceMapping(JSON.parse(readFileSync(join(import.meta.dirname, '..', '..', 'adapters', 'mappings', name), 'utf8')));
  if (!result.ok) throw new Error(result.problems.join('; '));
  return result.mapping;
}

describe('createMappedNdjsonReader', () => {
  const reader = createMappedNdjsonReader(mapping('bench-probe-cm.json'));

  it('reads a device line in its own names and units as our sample', () => {
    const frame = reader.text('{"time_ms": 13500, "channel": "ch1", "fl_cm": 5.23, "pa": 18.5, "q": 0.9}', 4);
    expect(frame).toMatchObject({ kind: 'sample', line: 4, muscle: 'calf', quality: 0.9, pennationDeg: 18.5 });
    if (frame.kind !== 'sample') throw new Error('not a sample');
    expect(frame.tS).toBeCloseTo(1, 12);
    expect(frame.fascicleMm).toBeCloseTo(52.3, 12);
  });

  it('gives the same frame from the line\'s bytes as from its text', () => {
    const text = '{"time_ms": 14000, "channel": "ch2", "fl_cm": 8.1}';
    const buffer = Buffer.from(`xx${text}\n`, 'utf8');
    expect(reader.bytes(buffer, 2, 2 + Buffer.byteLength(text), 7)).toEqual(reader.text(text, 7));
  });

  it.each([
    ['{"time_ms": 1', 'not_json'],
    ['[1, 2]', 'schema'],
    ['{"time_ms": 13500, "channel": "ch1", "fl_cm": -1}', 'out_of_range'],
    ['{"time_ms": 13500, "channel": "ch1", "fl_cm": 5, "__proto__": {"x": 1}}', 'unsafe_key'],
    ['{"time_ms": 13500, "event": "jump", "side": "left"}', 'unknown_event'],
  ])("rejects the bad line %s as %s, as it would our own line, with the device's line as the excerpt", (line, reason) => {
    const frame = reader.text(line, 2);
    expect(frame, line).toMatchObject({ kind: 'rejection', reason, line: 2 });
    if (frame.kind === 'rejection' && reason !== 'not_json') expect(frame.excerpt).toBe(line);
  });
});
