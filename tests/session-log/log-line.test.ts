import fc from 'fast-check';
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { lastValueFrom, toArray } from 'rxjs';
import { describe, expect, it } from 'vitest';
import { parseNdjsonLine } from '../../adapters/ndjson.ts';
import { fileSource } from '../../adapters/file-source.ts';
import { decodeMessage } from '../../adapters/device-mapping.ts';
import { makeRejection } from '../../adapters/parse-record.ts';
import { disconnection } from '../../adapters/websocket-client.ts';
import { logLine, rejectionLine, rxText } from '../../src/session-log/log-line.ts';
import { makeSample, type Frame } from '../../src/trial/records.ts';
import { REJECT_REASONS, type RejectReason } from '../../src/trial/reasons.ts';

const RX_MS = 1_764_000_000_123;

function line(f: Frame): string {
  const text = logLine(f, RX_MS);
  if (text === null) throw new Error(`no line for a ${f.kind}`);
  return text;
}

describe('logLine: valid records', () => {
  it('writes a sample as our record with its receive time, which the parser reads back as the same sample', () => {
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true }),
        fc.string({ minLength: 1 }),
        fc.double({ min: Number.MIN_VALUE, max: 1e6, noNaN: true }),
        fc.option(fc.double({ min: 0, max: 90, noNaN: true }), { nil: undefined }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (t, muscle, fascicleMm, pennation, quality) => {
          fc.pre(!['__proto__', 'constructor', 'prototype'].includes(muscle));
          const s = makeSample(t, muscle, fascicleMm, pennation ?? Number.NaN, quality, 3);
          const back = parseNdjsonLine(line(s), 3);
          expect(back.kind).toBe('sample');
          if (back.kind !== 'sample') return;
          expect([back.tS, back.muscle, back.fascicleMm, back.quality]).toEqual([s.tS, s.muscle, s.fascicleMm, s.quality]);
          expect(Object.is(back.pennationDeg, s.pennationDeg) || back.pennationDeg === s.pennationDeg).toBe(true);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('carries the receive time as "rx" in Unix seconds', () => {
    expect(JSON.parse(line(makeSample(1, 'calf', 50, Number.NaN, 1, 1)))).toEqual({ t: 1, muscle: 'calf', fascicle_mm: 50, rx: 1_764_000_000.123 });
    expect(rxText(RX_MS)).toBe('1764000000.123');
  });

  it('writes events, markers and headers so that they read back the same', () => {
    const frames = decodeMessage(
      JSON.stringify([
        { t: 2, event: 'foot_strike', side: 'left' },
        { t: 2.5, marker: 'speed up\nnow' },
        { format: 'lengthwise-stream', version: 1, subject: 'SYN-1', muscles: { calf: { side: 'left' } }, calibration: { muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 17500 } } } },
      ]),
      1,
    );
    for (const f of frames) {
      const text = line(f);
      expect(text).not.toContain('\n');
      expect(parseNdjsonLine(text, f.kind === 'header' || f.kind === 'event' || f.kind === 'marker' ? f.line : 0)).toEqual(f);
    }
  });

  it('writes a lost connection as a line of its own kind, which reads back as the same record', () => {
    const all = disconnection(null, 4.2, 'code 1006 connection lost', 9);
    expect(JSON.parse(line(all))).toEqual({ t: 4.2, disconnected: { muscles: null, detail: 'code 1006 connection lost' }, rx: 1_764_000_000.123 });
    expect(parseNdjsonLine(line(all), 9)).toEqual(all);
    const device = disconnection(['calf', 'thigh, front'], 2.5, 'device 2 (127.0.0.1:5000) code 1000 closed normally', 4);
    expect(parseNdjsonLine(line(device), 4)).toEqual(device);
  });

  it('writes a device clock restart as a line of its own kind, which reads back as the same record', () => {
    const reset: Frame = { kind: 'clock_reset', tS: 12.5, offsetS: 12.49, muscles: ['calf'], detail: 'the device of "calf" began a connection with a header and t=0.01 s, after t=10 s', line: 6 };
    expect(JSON.parse(line(reset))).toEqual({ t: 12.5, clock_reset: { offset_s: 12.49, muscles: ['calf'], detail: reset.kind === 'clock_reset' ? reset.detail : '' }, rx: 1_764_000_000.123 });
    expect(parseNdjsonLine(line(reset), 6)).toEqual(reset);
    expect(parseNdjsonLine('{"t":1,"clock_reset":{"offset_s":"x","muscles":null,"detail":""}}', 1)).toMatchObject({ reason: 'schema', message: expect.stringContaining('clock reset clock_reset.offset_s') });
  });

  it('leaves out the time of a connection that carried none, and the reader gives it back as none', () => {
    const early = disconnection(null, Number.NaN, 'code 1006', 2);
    expect(JSON.parse(line(early))).not.toHaveProperty('t');
    expect(parseNdjsonLine(line(early), 2)).toEqual(early);
  });

  it('rejects a lost-connection line that is not of its shape, saying what is accepted', () => {
    expect(parseNdjsonLine('{"t":1,"disconnected":{"muscles":"calf","detail":"x"}}', 1)).toMatchObject({
      kind: 'rejection',
      reason: 'schema',
      message: expect.stringContaining('disconnected.muscles is the string "calf": must be a list of muscle names, or null for every muscle'),
    });
    expect(parseNdjsonLine('{"t":1,"disconnected":{"muscles":null}}', 1)).toMatchObject({ reason: 'schema', message: expect.stringContaining('disconnected.detail is missing') });
  });

  it('leaves out the gaps and notices, which a replay derives again', () => {
    expect(logLine({ kind: 'gap', cause: 'disconnected', muscle: null, fromS: 4.2, toS: Number.NaN }, RX_MS)).toBeNull();
    expect(logLine({ kind: 'notice', muscle: null, text: 'x' }, RX_MS)).toBeNull();
  });
});

describe('logLine: rejections', () => {
  it.each(REJECT_REASONS)('writes %s rejections as one line with their count, which the reader counts as that many of that reason', (reason) => {
    const r = makeRejection(reason, `what failed for ${reason}`, 4, '{"t": 1, "excerpt": "of the input"}');
    const text = rejectionLine(r, 1234, RX_MS);
    expect(JSON.parse(text)).toEqual({ rejected: reason, count: 1234, rx: 1_764_000_000.123, message: r.message, excerpt: r.excerpt });
    expect(parseNdjsonLine(text, 4)).toEqual({ ...r, count: 1234 });
    expect(parseNdjsonLine(line(r), 4)).toEqual(r);
  });

  it('writes a line_too_long rejection as a short line, not padded, that a replay of the file counts as line_too_long', async () => {
    const r = makeRejection('line_too_long', 'message is over the cap', 1, 'xxxx');
    const text = rejectionLine(r, 3, RX_MS);
    expect(Buffer.byteLength(text)).toBeLessThan(200);
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-logline-'));
    const path = join(dir, 'log.ndjson');
    await writeFile(path, `${text}\n${line(makeSample(1, 'calf', 50, Number.NaN, 1, 2))}\n`);
    const frames = (await lastValueFrom(fileSource(path).pipe(toArray()))).flat();
    expect(frames.map((f) => (f.kind === 'rejection' ? `${f.reason} ${f.count}` : f.kind))).toEqual(['line_too_long 3', 'sample']);
  });

  it('gives each reason and count again whatever the message and excerpt hold (fuzzed)', () => {
    fc.assert(
      fc.property(fc.constantFrom<RejectReason>(...REJECT_REASONS), fc.integer({ min: 1, max: 1e9 }), fc.string(), fc.string({ unit: 'binary' }), (reason, count, message, excerpt) => {
        const back = parseNdjsonLine(rejectionLine(makeRejection(reason, message, 1, excerpt), count, RX_MS), 1);
        expect(back).toMatchObject({ kind: 'rejection', reason });
        expect(back.kind === 'rejection' && (back.count ?? 1)).toBe(count);
      }),
      { numRuns: 300 },
    );
  });

  it('refuses a rejection record with an unknown reason or a count that is not a whole number from 1, saying what is accepted', () => {
    expect(parseNdjsonLine('{"rejected":"bored","count":2}', 1)).toMatchObject({ reason: 'schema', message: expect.stringContaining('must be a reason code: not_json, schema') });
    for (const count of ['0', '1.5', '"3"', '1e12']) {
      expect(parseNdjsonLine(`{"rejected":"schema","count":${count}}`, 1)).toMatchObject({ reason: 'schema', message: expect.stringContaining('count') });
    }
  });

  it.each([
    ['schema', ''],
    ['out_of_range', ',"t":0,"muscle":"(rejected)","fascicle_mm":0'],
    ['unknown_event', ',"t":0,"event":"(rejected)","side":"left"'],
    ['unsafe_key', ',"__proto__":null'],
    ['too_deep', ',"nesting":[[[[[[[[[[]]]]]]]]]]'],
    ['not_json', ','],
  ] as const)('reads a rejection line of reason %s from logs written before rejections were summed up (one line per rejection) as that reason', (reason: RejectReason, rest) => {
    // Such a line: its reason, when it came, what it said and its excerpt, then whatever else the log wrote on it.
    const back = parseNdjsonLine(`{"rejected":"${reason}","rx":1764000000.123,"message":"m","excerpt":"e"${rest}}`, 1);
    expect(back).toMatchObject({ kind: 'rejection', reason });
    expect(back.kind === 'rejection' && back.count).toBeFalsy();
  });

  it('keeps a sample that carries an extra field named "rejected" a sample', () => {
    expect(parseNdjsonLine('{"t":1,"muscle":"calf","fascicle_mm":50,"rejected":"schema"}', 1)).toMatchObject({ kind: 'sample', muscle: 'calf' });
  });
});

describe('a line cut short by a crash', () => {
  it('is never a valid record: every shorter start of every kind of line is a rejection', () => {
    const lines = [
      line(makeSample(12.34, 'calf', 51.25, 20.5, 0.875, 1)),
      line({ kind: 'event', tS: 3, event: 'toe_off', side: 'right', line: 1 }),
      line({ kind: 'marker', tS: 3, marker: 'a marker', line: 1 }),
      line(disconnection(['calf'], 3, 'device 1 code 1006', 1)),
      ...decodeMessage('{"format": "lengthwise-stream", "version": 1, "rate_hz": 100}', 1).map(line),
      ...REJECT_REASONS.map((r) => rejectionLine(makeRejection(r, 'm', 1, 'e'), 7, RX_MS)),
    ];
    for (const text of lines) {
      for (let end = 1; end < text.length; end++) {
        expect(parseNdjsonLine(text.slice(0, end), 1).kind, `${text.slice(0, end)}`).toBe('rejection');
      }
    }
  });
});
