import { describe, expect, it } from 'vitest';
import { watchLag } from '../../src/session-log/watch-lag.ts';

function busy(ms: number): void {
  const end = Date.now() + ms;
  while (Date.now() < end) {
    // The event loop is held, as a slow batch would hold it.
  }
}

describe('watchLag', () => {
  it('says nothing while the loop keeps up', async () => {
    const lags: number[] = [];
    const sub = watchLag({ periodMs: 20, thresholdMs: 1000, onLag: (l) => lags.push(l) });
    await new Promise((r) => setTimeout(r, 150));
    sub.unsubscribe();
    expect(lags).toEqual([]);
  });

  it('says once that processing fell behind when the loop is held past the threshold, then that it caught up', async () => {
    const lags: number[] = [];
    const sub = watchLag({ periodMs: 20, thresholdMs: 300, onLag: (l) => lags.push(l) });
    await new Promise((r) => setTimeout(r, 50));
    busy(500);
    // The all-clear comes at the next look after the loop is free; a loaded machine may take longer.
    for (const end = Date.now() + 5000; lags.length < 2 && Date.now() < end; ) await new Promise((r) => setTimeout(r, 20));
    sub.unsubscribe();
    expect(lags).toHaveLength(2);
    expect(lags[0]).toBeGreaterThan(300);
    expect(lags[1]).toBe(0);
  });

  it('stops looking once unsubscribed', async () => {
    const lags: number[] = [];
    const sub = watchLag({ periodMs: 20, thresholdMs: 100, onLag: (l) => lags.push(l) });
    sub.unsubscribe();
    busy(200);
    await new Promise((r) => setTimeout(r, 60));
    expect(lags).toEqual([]);
  });
});
