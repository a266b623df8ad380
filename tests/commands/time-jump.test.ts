import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { sendAll, until, wsClient } from '../adapters/ws-peers.ts';
import { killChild, lengthwise, listeningPort, type Child } from '../helpers/command-child.ts';

/** An invented walk of one muscle: 100 Hz samples with a 1.1 s cycle, from fromS for durationS. */
function walkLines(fromS: number, durationS: number, muscle = 'calf'): string[] {
  const lines: string[] = [];
  for (let i = 0; i < durationS * 100; i++) {
    const t = fromS + i / 100;
    lines.push(JSON.stringify({ t: Math.round(t * 1000) / 1000, muscle, fascicle_mm: Math.round((55 - 6 * Math.cos((2 * Math.PI * (t - fromS)) / 1.1)) * 100) / 100 }));
  }
  return lines;
}

describe('a valid sample that claims a huge jump of device time', () => {
  it.each([1e7, 1e8, 1e12])('is a gap, not a crash: replay writes the summary, with the samples after a jump to t=%d counted', async (jumpS) => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-jump-'));
    const trial = join(dir, 'jump.ndjson');
    await writeFile(trial, [...walkLines(0, 0.01), ...walkLines(jumpS, 30)].join('\n'));
    const summaryPath = join(dir, 's.json');
    const ran = lengthwise(['replay', trial, '--speed', 'max', '--plain', '--summary', summaryPath]);
    expect((await ran.exited).code, ran.stderr).toBe(0);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8'));
    expect(summary.frames).toMatchObject({ accepted: 3001, rejected: 0 });
    // Its strides are found from its own signal after the jump (no gait events in this trial).
    expect(summary.muscles.calf.segmentation).toBe('estimated');
    expect(summary.muscles.calf.trial.stride_count).toBeGreaterThan(15);
  });
});

describe('a live device that sends one sample with a huge jump of device time', () => {
  let child: Child | null = null;
  afterEach(() => {
    if (child !== null) killChild(child);
  });

  it('ends nothing: every device goes on, and the summary counts both', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-jump-live-'));
    const summaryPath = join(dir, 's.json');
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--plain', '--log', join(dir, 'l.ndjson'), '--summary', summaryPath]);
    child = c;
    const url = `ws://127.0.0.1:${await listeningPort(c)}`;
    const a = await wsClient(url);
    const b = await wsClient(url);
    await sendAll(a, [`[${walkLines(0, 0.01, 'calf').join(',')}]`, `[${walkLines(1e8, 0.01, 'calf').join(',')}]`]);
    const shin = walkLines(0, 12, 'shin');
    for (let i = 0; i < shin.length; i += 100) await sendAll(b, [`[${shin.slice(i, i + 100).join(',')}]`]);
    await sendAll(a, [`[${walkLines(1e8 + 0.01, 12, 'calf').join(',')}]`]);
    // The session is still up: a further message from the other device is taken.
    await sendAll(b, [walkLines(12, 0.01, 'shin').join('')]);
    a.close();
    b.close();
    await until(() => (c.stderr.match(/DISCONNECTED/g) ?? []).length >= 2, 10_000, 'both devices to leave');
    c.child.kill('SIGTERM');
    expect((await c.exited).code, c.stderr).toBe(0);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8'));
    expect(summary.frames).toMatchObject({ accepted: 2 + 1200 + 1200 + 1, rejected: 0 });
    expect(Object.keys(summary.muscles).sort()).toEqual(['calf', 'shin']);
  });
});
