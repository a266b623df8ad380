import { describe, expect, it } from 'vitest';
import { decodeMessage } from '../../adapters/device-mapping.ts';
import { DeviceClocks, newConnectionClock } from '../../adapters/device-clocks.ts';
import type { ClockReset, Frame, Sample } from '../../src/trial/records.ts';

const HEADER = JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'left' } } });

function message(...records: unknown[]): Frame[] {
  return decodeMessage(JSON.stringify(records.map((r) => (typeof r === 'string' ? JSON.parse(r) : r))), 1);
}

function samples(fromS: number, n: number, muscle = 'calf'): unknown[] {
  return Array.from({ length: n }, (_, i) => ({ t: Math.round((fromS + i * 0.01) * 1000) / 1000, muscle, fascicle_mm: 50 }));
}

const times = (frames: Frame[]): number[] => frames.filter((f): f is Sample => f.kind === 'sample').map((f) => f.tS);

describe('DeviceClocks', () => {
  it('continues the timeline of a device that comes back with a header and its clock at zero: offset, shifted times, one ClockReset', () => {
    const clocks = new DeviceClocks(false);
    clocks.take(message(HEADER, ...samples(0, 1001)), newConnectionClock(), 1_000_000, 1);
    const again = newConnectionClock();
    // Two seconds of wall time later, the restarted device starts from 0 again.
    const out = clocks.take(message(HEADER, ...samples(0, 3)), again, 1_002_000, 1);
    const reset = out.find((f): f is ClockReset => f.kind === 'clock_reset');
    expect(reset).toMatchObject({ offsetS: 12, tS: 12, muscles: ['calf'] });
    expect(reset?.detail).toMatch(/began a connection with a header and t=0 s, after t=10 s/);
    expect(out.map((f) => f.kind)).toEqual(['header', 'clock_reset', 'sample', 'sample', 'sample']);
    expect(times(out)).toEqual([12, 12.01, 12.02]);
    // Later messages of that connection go on shifted; the offset is said once.
    const later = clocks.take(message(...samples(0.03, 2), { t: 0.05, event: 'foot_strike', side: 'left' }), again, 1_002_100, 5);
    expect(later.map((f) => ('tS' in f ? f.tS : null))).toEqual([12.03, 12.04, 12.05]);
    expect(later.some((f) => f.kind === 'clock_reset')).toBe(false);
  });

  it('leaves records sent again after a reconnection (a small step back) to be rejected as they are', () => {
    const clocks = new DeviceClocks(false);
    clocks.take(message(HEADER, ...samples(0, 501)), newConnectionClock(), 0, 1);
    const out = clocks.take(message(HEADER, ...samples(4.7, 40)), newConnectionClock(), 500, 1);
    expect(out.some((f) => f.kind === 'clock_reset')).toBe(false);
    expect(times(out)[0]).toBe(4.7);
  });

  it('takes no connection without a header, and no other device, for a restart', () => {
    const clocks = new DeviceClocks(false);
    clocks.take(message(HEADER, ...samples(100, 10)), newConnectionClock(), 0, 1);
    expect(clocks.take(message(...samples(0, 3)), newConnectionClock(), 10, 1).some((f) => f.kind === 'clock_reset')).toBe(false);
    const other = JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { shin: {} } });
    expect(clocks.take(message(other, ...samples(0, 3, 'shin')), newConnectionClock(), 10, 1).some((f) => f.kind === 'clock_reset')).toBe(false);
  });

  it('for the one peer of a client, compares with everything the session has seen, events first included', () => {
    const clocks = new DeviceClocks(true);
    clocks.take(message('{"format": "lengthwise-stream", "version": 1}', ...samples(0, 301)), newConnectionClock(), 0, 1);
    const out = clocks.take(message('{"format": "lengthwise-stream", "version": 1}', { t: 0.2, event: 'foot_strike', side: 'left' }, ...samples(0.21, 1)), newConnectionClock(), 0, 1);
    expect(out.map((f) => f.kind)).toEqual(['header', 'clock_reset', 'event', 'sample']);
    // No wall time passed between the two: the restarted clock goes on a millisecond after the last time seen (3 s).
    expect(out[1]).toMatchObject({ muscles: null, offsetS: 2.801 });
    const after = out.map((f) => ('tS' in f ? f.tS : Number.NaN)).slice(2);
    expect(after[0]).toBeCloseTo(3.001, 9);
    expect(after[1]).toBeCloseTo(3.011, 9);
  });

  it('waits for the first sample of a device whose header names no muscle it had', () => {
    const clocks = new DeviceClocks(false);
    clocks.take(message(HEADER, ...samples(0, 501)), newConnectionClock(), 0, 1);
    const out = clocks.take(message('{"format": "lengthwise-stream", "version": 1}', { t: 0, marker: 'restart' }, ...samples(0, 2)), newConnectionClock(), 0, 1);
    expect(out.map((f) => f.kind)).toEqual(['header', 'marker', 'clock_reset', 'sample', 'sample']);
    expect(out[1]).toMatchObject({ tS: 0 });
    const [first, second] = times(out);
    expect(first).toBeCloseTo(5.001, 9);
    expect(second).toBeCloseTo(5.011, 9);
  });
});
