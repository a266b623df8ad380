import { describe, expect, it } from 'vitest';
import { disconnection } from '../../adapters/websocket-client.ts';
import { restoreGaps } from '../../src/pipeline/restore-gaps.ts';
import type { Frame } from '../../src/trial/records.ts';
import { runBatches, runFrames, sample } from '../helpers/frames.ts';

describe('restoreGaps', () => {
  it('passes an empty source and batches without disconnections unchanged', async () => {
    expect(await runBatches(restoreGaps(), [])).toEqual([]);
    const batch = [sample(0, 'calf', 50), { kind: 'marker', tS: 0, marker: 'start', line: 2 } as Frame];
    expect((await runBatches(restoreGaps(), [batch]))[0]).toBe(batch);
  });

  it('puts the gaps of each disconnection right after it: one for every muscle, or one per muscle the device carried', async () => {
    const all = disconnection(null, 1.5, 'code 1006', 3);
    const device = disconnection(['calf', 'shin'], 2.5, 'device 2', 7);
    const before = sample(1.5, 'calf', 50);
    const after = sample(2.6, 'calf', 51);
    const out = await runFrames(restoreGaps(), [[before, all, after], [device]]);
    expect(out).toEqual([
      before,
      all,
      { kind: 'gap', cause: 'disconnected', muscle: null, fromS: 1.5, toS: Number.NaN },
      after,
      device,
      { kind: 'gap', cause: 'disconnected', muscle: 'calf', fromS: 2.5, toS: Number.NaN },
      { kind: 'gap', cause: 'disconnected', muscle: 'shin', fromS: 2.5, toS: Number.NaN },
    ]);
  });

  it('reads nothing into a marker, whatever its text', async () => {
    const marker: Frame = { kind: 'marker', tS: 1, marker: '[link] disconnected: code 1006', line: 1 };
    expect(await runFrames(restoreGaps(), [[marker]])).toEqual([marker]);
  });

  it('propagates an error from upstream', async () => {
    const { throwError } = await import('rxjs');
    await expect(runFrames(() => throwError(() => new Error('upstream')).pipe(restoreGaps()), [])).rejects.toThrow('upstream');
  });
});
