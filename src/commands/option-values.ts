/** Option values the commands share, each read one way everywhere: a value, or a message saying what is accepted. */
import { BlockList, isIP } from 'node:net';
import { redactUrl } from '../../adapters/redact-url.ts';

export type Parsed<T> = { readonly ok: true; readonly value: T } | { readonly ok: false; readonly message: string };

export interface ListenAddress {
  readonly host: string;
  readonly port: number;
}

/** Reads `--listen`: PORT, HOST:PORT or [IPv6]:PORT; the host is 127.0.0.1 unless given. */
export function parseListen(text: string): Parsed<ListenAddress> {
  const m = /^(?:\[([^\]]+)\]:|([^:[\]]+):)?(\d{1,5})$/.exec(text.trim());
  const port = m === null ? Number.NaN : Number(m[3]);
  if (m === null || !(port >= 0 && port <= 65535)) {
    return { ok: false, message: `--listen "${text}" is not an address: give PORT (e.g. 8765), HOST:PORT (e.g. 0.0.0.0:8765) or [IPv6]:PORT; PORT is 0–65535` };
  }
  return { ok: true, value: { host: m[1] ?? m[2] ?? '127.0.0.1', port } };
}

/** The loopback addresses: 127.0.0.0/8 and ::1 (IPv4-mapped 127.x included). */
const LOOPBACK = new BlockList();
LOOPBACK.addSubnet('127.0.0.0', 8, 'ipv4');
LOOPBACK.addAddress('::1', 'ipv6');

/**
 * True when a host to listen on reaches this machine only: a loopback address, or `localhost`. Any
 * other name is taken as reachable from elsewhere (what it resolves to is not known here).
 */
export function isLoopbackHost(host: string): boolean {
  if (host.toLowerCase() === 'localhost') return true;
  const family = isIP(host);
  return family !== 0 && LOOPBACK.check(host, family === 4 ? 'ipv4' : 'ipv6');
}

/** Reads `--connect`: a ws:// or wss:// URL. A token in it is never repeated in a message. */
export function parseConnect(text: string): Parsed<string> {
  let url: URL;
  const shown = redactUrl(text);
  try {
    url = new URL(text);
  } catch {
    return { ok: false, message: `--connect "${shown}" is not a URL: give ws://HOST:PORT/PATH, e.g. ws://127.0.0.1:8765` };
  }
  if (url.protocol !== 'ws:' && url.protocol !== 'wss:') {
    return { ok: false, message: `--connect "${shown}" is a ${url.protocol} URL: give a ws:// or wss:// URL, e.g. ws://127.0.0.1:8765` };
  }
  return { ok: true, value: url.href };
}

/** Reads `--duration`: seconds above 0. */
export function parseDuration(text: string): Parsed<number> {
  const n = Number(text);
  if (text.trim() === '' || !Number.isFinite(n) || !(n > 0)) {
    return { ok: false, message: `--duration "${text}" is not a duration: give seconds above 0, e.g. 60` };
  }
  return { ok: true, value: n };
}
