/** Real peers on 127.0.0.1 for the live adapter tests: plain ws servers, a silent peer, small waits. */
import { createHash } from 'node:crypto';
import { createServer, type Server, type Socket } from 'node:net';
import type { AddressInfo } from 'node:net';
import { WebSocket, WebSocketServer } from 'ws';
import type { Batch, Frame } from '../../src/trial/records.ts';

/** A ws server on 127.0.0.1 (port 0 unless given); resolves once it listens. */
export function wsServer(port = 0): Promise<{ server: WebSocketServer; port: number; url: string }> {
  return new Promise((resolve, reject) => {
    const server = new WebSocketServer({ host: '127.0.0.1', port });
    server.once('error', reject);
    server.once('listening', () => {
      const p = (server.address() as AddressInfo).port;
      resolve({ server, port: p, url: `ws://127.0.0.1:${p}` });
    });
  });
}

/** Closes a ws server and cuts its connections (as a crashed acquisition computer would). */
export function killServer(server: WebSocketServer): Promise<void> {
  for (const c of server.clients) c.terminate();
  return new Promise((resolve) => server.close(() => resolve()));
}

/** The next connection to a ws server. */
export function nextConnection(server: WebSocketServer): Promise<WebSocket> {
  return new Promise((resolve) => server.once('connection', (ws) => resolve(ws)));
}

/** Sends each text and waits until the socket's buffer is empty. */
export async function sendAll(ws: WebSocket, texts: readonly (string | Buffer)[]): Promise<void> {
  for (const t of texts) {
    await new Promise<void>((resolve, reject) => ws.send(t, { binary: Buffer.isBuffer(t) }, (e) => (e ? reject(e) : resolve())));
  }
}

/** A client connected to url (with optional headers); resolves once open. */
export function wsClient(url: string, headers: Record<string, string> = {}): Promise<WebSocket> {
  return new Promise((resolve, reject) => {
    const ws = new WebSocket(url, { headers });
    ws.once('open', () => resolve(ws));
    ws.once('error', reject);
  });
}

/** The HTTP status a server answers an upgrade with, when it refuses it (null when it accepts, -1 when nothing answers). */
export function upgradeStatus(url: string, headers: Record<string, string> = {}): Promise<number | null> {
  return new Promise((resolve) => {
    const ws = new WebSocket(url, { headers });
    ws.once('open', () => {
      ws.close();
      resolve(null);
    });
    ws.once('unexpected-response', (_req, res) => {
      resolve(res.statusCode ?? -1);
      ws.terminate();
    });
    ws.once('error', () => resolve(-1));
  });
}

/** Waits until check() is true, looking every 10 ms; fails after timeoutMs. */
export async function until(check: () => boolean, timeoutMs = 4000, what = 'the condition'): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (!check()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

export interface SilentPeer {
  readonly server: Server;
  readonly port: number;
  readonly sockets: Set<Socket>;
  /** Cuts every socket and closes the server. */
  close(): Promise<void>;
}

/**
 * A peer that completes the WebSocket handshake and then says nothing, not even a pong: a dead peer
 * whose TCP connection stays up.
 */
export function silentPeer(): Promise<SilentPeer> {
  return new Promise((resolve) => {
    const sockets = new Set<Socket>();
    const server = createServer((socket) => {
      sockets.add(socket);
      socket.on('close', () => sockets.delete(socket));
      socket.on('error', () => undefined);
      socket.once('data', (data) => {
        const key = /Sec-WebSocket-Key: *(\S+)/i.exec(data.toString())?.[1] ?? '';
        // RFC 6455 section 4.2.2: the accept value is base64(SHA-1(key + the protocol's GUID)).
        const accept = createHash('sha1').update(`${key}258EAFA5-E914-47DA-95CA-C5AB0DC85B11`).digest('base64');
        socket.write(`HTTP/1.1 101 Switching Protocols\r\nUpgrade: websocket\r\nConnection: Upgrade\r\nSec-WebSocket-Accept: ${accept}\r\n\r\n`);
      });
    });
    const close = (): Promise<void> =>
      new Promise((done) => {
        for (const s of sockets) s.destroy();
        server.close(() => done());
      });
    server.listen(0, '127.0.0.1', () => resolve({ server, port: (server.address() as AddressInfo).port, sockets, close }));
  });
}

/** All frames of the batches, flattened. */
export function flat(batches: readonly Batch[]): Frame[] {
  return batches.flat();
}

/** Invented samples: `n` of muscle `muscle` from time `fromS` at 100 Hz, one JSON object each. */
export function sampleTexts(n: number, muscle = 'calf', fromS = 0): string[] {
  const out: string[] = [];
  for (let i = 0; i < n; i++) {
    out.push(JSON.stringify({ t: Math.round((fromS + i * 0.01) * 1000) / 1000, muscle, fascicle_mm: 50 + (i % 7) * 0.5, quality: 0.9 }));
  }
  return out;
}
