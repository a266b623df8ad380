/**
 * Session logs written before a lost connection had a line of its own carry it as a `[link] disconnected`
 * marker. Such a log must replay as it always did: the same records, the same gaps, the same summary.
 * The logs here are invented by the test: two muscles at 100 Hz, a drop of the one peer, then one of
 * two devices leaving.
 */
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { lastValueFrom, toArray } from 'rxjs';
import { describe, expect, it } from 'vitest';
import { fileSource } from '../../adapters/file-source.ts';
import { summaryJson } from '../../src/output/summary-json.ts';
import { restoreGaps } from '../../src/pipeline/restore-gaps.ts';
import { runTrial } from '../../src/run/run-trial.ts';
import type { Frame } from '../../src/trial/records.ts';

const RX_START = 1_764_000_000;

/** The session's lines; `lost(t, muscles, detail)` writes each lost connection in one log form or the other. */
function sessionLines(lost: (tS: number, muscles: readonly string[] | null, detail: string) => object | null): string[] {
  const lines: (object | null)[] = [
    {
      format: 'lengthwise-stream',
      version: 1,
      subject: 'SYN-OLD',
      muscles: { calf: { side: 'left' }, shin: { side: 'right' } },
      calibration: { muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 21000 }, shin: { method: 'sarcomere_count', sarcomeres_in_series: 19000 } } },
    },
  ];
  for (let i = 0; i < 400; i++) {
    const tS = i / 100;
    if (i % 110 === 0) lines.push({ t: tS, event: 'foot_strike', side: 'left' });
    if (i % 110 === 55) lines.push({ t: tS, event: 'foot_strike', side: 'right' });
    if (i === 200) lines.push({ t: tS, marker: 'marker 1 at trial time 0:02.0 (10:15:00)' });
    lines.push({ t: tS, muscle: 'calf', fascicle_mm: Number((58 + 7 * Math.sin((2 * Math.PI * tS) / 1.1)).toFixed(3)) });
    lines.push({ t: tS, muscle: 'shin', fascicle_mm: Number((44 + 5 * Math.cos((2 * Math.PI * tS) / 1.1)).toFixed(3)) });
    if (i === 150) lines.push(lost(tS, null, 'code 1006 connection lost'));
    if (i === 270) lines.push(lost(tS, ['shin'], 'device 2 (127.0.0.1:40112) code 1001 peer going away'));
  }
  return lines.filter((l): l is object => l !== null).map((l, i) => JSON.stringify({ ...l, rx: RX_START + i / 200 }));
}

const OLD_FORM = sessionLines((t, muscles, detail) => ({
  t,
  marker: muscles === null ? `[link] disconnected: ${detail}` : `[link] disconnected ${JSON.stringify(muscles)}: ${detail}`,
}));
const NEW_FORM = sessionLines((t, muscles, detail) => ({ t, disconnected: { muscles, detail } }));
const NO_DROPS = sessionLines(() => null);

async function logFile(name: string, lines: readonly string[]): Promise<string> {
  const path = join(await mkdtemp(join(tmpdir(), 'lengthwise-old-log-')), name);
  await writeFile(path, `${lines.join('\n')}\n`);
  return path;
}

async function framesOf(path: string): Promise<Frame[]> {
  return (await lastValueFrom(fileSource(path).pipe(restoreGaps(), toArray()))).flat();
}

async function summaryOf(path: string): Promise<Record<string, unknown>> {
  const { source: _source, ...rest } = JSON.parse(JSON.stringify(summaryJson(await runTrial(fileSource(path), { source: path }).done)));
  return rest;
}

describe('a session log written before lost connections had a line of their own', () => {
  it('reads each link marker as the lost connection it stood for, with its gaps, where the marker stood', async () => {
    const frames = await framesOf(await logFile('old.ndjson', OLD_FORM));
    const at = frames.findIndex((f) => f.kind === 'disconnection');
    expect(frames.slice(at, at + 2)).toEqual([
      { kind: 'disconnection', tS: 1.5, muscles: null, detail: 'code 1006 connection lost', line: at + 1 },
      { kind: 'gap', cause: 'disconnected', muscle: null, fromS: 1.5, toS: Number.NaN },
    ]);
    expect(frames.filter((f) => f.kind === 'gap').map((f) => (f.kind === 'gap' ? f.muscle : ''))).toEqual([null, 'shin']);
    expect(frames.filter((f) => f.kind === 'marker')).toHaveLength(1);
  });

  it('gives the same records as the log written now', async () => {
    const old = await framesOf(await logFile('old.ndjson', OLD_FORM));
    const now = await framesOf(await logFile('new.ndjson', NEW_FORM));
    expect(old).toEqual(now);
  });

  it('gives the same summary as the log written now, counting each lost connection among the markers as it always did', async () => {
    const old = await summaryOf(await logFile('old.ndjson', OLD_FORM));
    expect(old).toEqual(await summaryOf(await logFile('new.ndjson', NEW_FORM)));
    expect(old['frames']).toMatchObject({ markers: 3, gait_events: 8, headers: 1, rejected: 0, accepted: 800 });
    // The filters did restart: without the lost connections the same samples give other figures.
    expect(old['muscles']).not.toEqual((await summaryOf(await logFile('none.ndjson', NO_DROPS)))['muscles']);
  });
});
