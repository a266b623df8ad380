import { describe, expect, it } from 'vitest';
import { isLoopbackHost, parseConnect, parseDuration, parseListen } from '../../src/commands/option-values.ts';

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

  it('tells loopback hosts from hosts other machines may reach', () => {
    // Loopback: 127.0.0.0/8 (RFC 1122 §3.2.1.3, Braden 1989), ::1 (RFC 4291 §2.5.3, Hinden & Deering 2006),
    // IPv4-mapped addresses (RFC 4291 §2.5.5.2) and the name localhost (RFC 6761 §6.3, Cheshire & Krochmal 2013).
    for (const host of ['127.0.0.1', '127.1.2.3', '127.255.255.255', '::1', '0:0:0:0:0:0:0:1', '::ffff:127.0.0.1', 'localhost', 'LOCALHOST']) {
      expect(isLoopbackHost(host), host).toBe(true);
    }
    for (const host of ['0.0.0.0', '::', '128.0.0.1', '10.0.0.7', '192.168.1.20', '::2', '::ffff:10.0.0.1', 'lab-pc', 'localhost.lab.invalid', '']) {
      expect(isLoopbackHost(host), host).toBe(false);
    }
  });

  it('reads a duration in seconds above 0', () => {
    expect(parseDuration('2.5')).toEqual({ ok: true, value: 2.5 });
    for (const bad of ['', '0', '-1', 'soon']) expect(parseDuration(bad).ok).toBe(false);
  });
});
