import { describe, expect, it } from 'vitest';
import { parseConnect, parseDuration, parseListen } from '../../src/commands/option-values.ts';

describe('option values shared by live and simulate', () => {
  it('reads a listen address: a port, host:port or [ipv6]:port, and explains anything else', () => {
    expect(parseListen('8765')).toEqual({ ok: true, value: { host: '127.0.0.1', port: 8765 } });
    expect(parseListen('0.0.0.0:0')).toEqual({ ok: true, value: { host: '0.0.0.0', port: 0 } });
    expect(parseListen('[::1]:9000')).toEqual({ ok: true, value: { host: '::1', port: 9000 } });
    for (const bad of ['', 'abc', '70000', 'host:', ':80', '1.2.3.4:99999']) {
      expect(parseListen(bad)).toMatchObject({ ok: false, message: expect.stringMatching(/give PORT \(e\.g\. 8765\), HOST:PORT .* PORT is 0–65535/) });
    }
  });

  it('reads a ws:// or wss:// URL, and says why anything else is not one', () => {
    expect(parseConnect('ws://h:1/p')).toEqual({ ok: true, value: 'ws://h:1/p' });
    expect(parseConnect('wss://lab.invalid/stream').ok).toBe(true);
    expect(parseConnect('http://h:1')).toMatchObject({ ok: false, message: expect.stringContaining('is a http: URL') });
    expect(parseConnect('nowhere')).toMatchObject({ ok: false, message: expect.stringContaining('is not a URL') });
  });

  it('reads a duration in seconds above 0', () => {
    expect(parseDuration('2.5')).toEqual({ ok: true, value: 2.5 });
    for (const bad of ['', '0', '-1', 'soon']) expect(parseDuration(bad).ok).toBe(false);
  });
});
