import { describe, expect, it } from 'vitest';
import { markerFrame, oldLinkMarker } from '../../adapters/old-link-marker.ts';
import { parseNdjsonLine } from '../../adapters/ndjson.ts';

describe('oldLinkMarker: the marker text logs carried for a lost connection before it had a line of its own', () => {
  it('reads every muscle, or the list of muscles one device carried, and the detail after it', () => {
    expect(oldLinkMarker(1.5, '[link] disconnected: code 1006 connection lost', 3)).toEqual({
      kind: 'disconnection',
      tS: 1.5,
      muscles: null,
      detail: 'code 1006 connection lost',
      line: 3,
    });
    expect(oldLinkMarker(2, '[link] disconnected ["calf","thigh, front","a]: b"]: device 2 code 1000', 4)).toMatchObject({
      muscles: ['calf', 'thigh, front', 'a]: b'],
      detail: 'device 2 code 1000',
    });
    expect(oldLinkMarker(2, '[link] disconnected []: device 3', 4)).toMatchObject({ muscles: [], detail: 'device 3' });
  });

  it('leaves any other text a marker', () => {
    for (const text of ['treadmill speed up', '[link] disconnected soon', '[link] disconnected [not json]: x', '[link] disconnectedness', '(typed) [link] disconnected: x']) {
      expect(oldLinkMarker(0, text, 1)).toBeNull();
      expect(markerFrame(0, text, 1)).toEqual({ kind: 'marker', tS: 0, marker: text, line: 1 });
    }
  });

  it('is how the reader takes an old log line, receive time and all', () => {
    expect(parseNdjsonLine('{"t":0.49,"marker":"[link] disconnected: code 1006","rx":1764000000.123}', 12)).toEqual({
      kind: 'disconnection',
      tS: 0.49,
      muscles: null,
      detail: 'code 1006',
      line: 12,
    });
    expect(parseNdjsonLine('{"t":0.29,"marker":"[link] disconnected [\\"calf\\"]: device 1 (127.0.0.1:5000) code 1006","rx":1.5}', 5)).toMatchObject({
      kind: 'disconnection',
      muscles: ['calf'],
      detail: 'device 1 (127.0.0.1:5000) code 1006',
    });
  });
});
