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

  it('puts the gaps of a device whose clock restarted after its record, and says it once as a notice', async () => {
    const reset: Frame = { kind: 'clock_reset', tS: 12, offsetS: 12, muscles: ['calf'], detail: 'the device of "calf" began a connection with a header and t=0 s, after t=10 s', line: 4 };
    const out = await runFrames(restoreGaps(), [[reset]]);
    expect(out.slice(0, 2)).toEqual([reset, { kind: 'gap', cause: 'disconnected', muscle: 'calf', fromS: Number.NaN, toS: 12 }]);
    expect(out[2]).toMatchObject({ kind: 'notice', muscle: null, text: expect.stringMatching(/clock restarted .*from t=12 s go on the session's timeline shifted by 12 s/) });
    expect(out).toHaveLength(3);
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
