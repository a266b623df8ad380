import { afterEach, describe, expect, it } from 'vitest';
import { asyncScheduler } from 'rxjs';
import { WebSocket, WebSocketServer } from 'ws';
import type { AddressInfo } from 'node:net';
import { closeGently, keepAlive } from '../../adapters/socket-care.ts';

const servers: WebSocketServer[] = [];
afterEach(async () => {
  await Promise.all(servers.splice(0).map((s) => new Promise((r) => s.close(r))));
});

async function pair(): Promise<{ client: WebSocket; server: WebSocket }> {
  const wss = new WebSocketServer({ host: '127.0.0.1', port: 0 });
  servers.push(wss);
  await new Promise((r) => wss.on('listening', r));
  const serverSide = new Promise<WebSocket>((r) => wss.on('connection', r));
  const client = new WebSocket(`ws://127.0.0.1:${(wss.address() as AddressInfo).port}`);
  await new Promise((r) => client.on('open', r));
  return { client, server: await serverSide };
}

describe('keepAlive', () => {
  it('keeps a peer that answers pings, and takes its listeners away when stopped', async () => {
    const { client, server } = await pair();
    const dead: string[] = [];
    const before = server.listenerCount('pong');
    const care = keepAlive(server, 100, asyncScheduler, (why) => dead.push(why));
    await new Promise((r) => setTimeout(r, 500));
    expect(dead).toEqual([]);
    expect(server.readyState).toBe(WebSocket.OPEN);
    care.unsubscribe();
    expect(server.listenerCount('pong')).toBe(before);
    client.terminate();
  });

  it('cuts a peer that stops answering, saying why', async () => {
    const { client, server } = await pair();
    // The client's socket stops reading, so no pong comes back.
    (client as unknown as { _socket: { pause(): void } })._socket.pause();
    const dead: string[] = [];
    const closed = new Promise<void>((r) => server.on('close', () => r()));
    keepAlive(server, 40, asyncScheduler, (why) => dead.push(why));
    await closed;
    expect(dead[0]).toContain('no answer to ping within 40 ms');
    client.terminate();
  });
});

describe('closeGently', () => {
  it('closes an open socket with its code and reason', async () => {
    const { client, server } = await pair();
    const seen = new Promise<[number, string]>((r) => client.on('close', (code, reason) => r([code, reason.toString()])));
    closeGently(server, 1001, 'receiver stopping');
    expect(await seen).toEqual([1001, 'receiver stopping']);
  });
});
