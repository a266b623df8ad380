import { describe, expect, it } from 'vitest';
import { disconnectionFrames, linkMarkerText } from '../../adapters/websocket-client.ts';
import { linkMarkerMuscles, restoreGaps } from '../../src/pipeline/restore-gaps.ts';
import type { Frame } from '../../src/trial/records.ts';
import { runBatches, runFrames, sample } from '../helpers/frames.ts';

describe('linkMarkerMuscles', () => {
  it('reads every muscle, a list of muscles, or no link marker at all', () => {
    expect(linkMarkerMuscles(linkMarkerText(null, 'code 1006'))).toBeNull();
    expect(linkMarkerMuscles(linkMarkerText(['calf', 'thigh, front', 'a]: b'], 'device 2 code 1000'))).toEqual(['calf', 'thigh, front', 'a]: b']);
    expect(linkMarkerMuscles(linkMarkerText([], 'device 3'))).toEqual([]);
    expect(linkMarkerMuscles('treadmill speed up')).toBeUndefined();
    expect(linkMarkerMuscles('[link] disconnected soon')).toBeUndefined();
    expect(linkMarkerMuscles('[link] disconnected [not json]: x')).toBeUndefined();
    expect(linkMarkerMuscles('[link] disconnectedness')).toBeUndefined();
  });
});

describe('restoreGaps', () => {
  it('passes an empty source and batches without link markers unchanged', async () => {
    expect(await runBatches(restoreGaps(), [])).toEqual([]);
    const batch = [sample(0, 'calf', 50), { kind: 'marker', tS: 0, marker: 'start', line: 2 } as Frame];
    expect((await runBatches(restoreGaps(), [batch]))[0]).toBe(batch);
  });

  it('puts back the gaps the live session had after each disconnection marker, in place', async () => {
    const [allMarker, allGap] = disconnectionFrames(null, 1.5, 'code 1006', 3);
    const deviceFrames = disconnectionFrames(['calf', 'shin'], 2.5, 'device 2', 7);
    const before = sample(1.5, 'calf', 50);
    const after = sample(2.6, 'calf', 51);
    const out = await runFrames(restoreGaps(), [[before, allMarker as Frame, after], [deviceFrames[0] as Frame]]);
    expect(out).toEqual([before, allMarker, { ...allGap, fromS: 1.5 }, after, ...deviceFrames]);
  });

  it('propagates an error from upstream', async () => {
    const { throwError } = await import('rxjs');
    await expect(runFrames(() => throwError(() => new Error('upstream')).pipe(restoreGaps()), [])).rejects.toThrow('upstream');
  });
});
