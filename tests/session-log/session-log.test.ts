import { existsSync } from 'node:fs';
import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { VirtualAction, VirtualTimeScheduler } from 'rxjs';
import { describe, expect, it } from 'vitest';
import { defaultLogPath, openSessionLog } from '../../src/session-log/session-log.ts';

async function dir(): Promise<string> {
  return mkdtemp(join(tmpdir(), 'lengthwise-session-log-'));
}

/** Virtual time that runs the flush timer up to `ms`, then stops. */
function clockUntil(ms: number): VirtualTimeScheduler {
  return new VirtualTimeScheduler(VirtualAction, ms);
}

describe('openSessionLog', () => {
  it('creates the file and its folders, and writes nothing for an empty session', async () => {
    const path = join(await dir(), 'sessions', 'a', 'log.ndjson');
    const log = openSessionLog({ path });
    log.close();
    expect(await readFile(path, 'utf8')).toBe('');
    expect(log).toMatchObject({ complete: true, problem: null, linesWritten: 0, linesLost: 0 });
  });

  it('writes one line for each tally kept since the last write, after the lines, as the first call for its key made it', async () => {
    const path = join(await dir(), 'log.ndjson');
    const scheduler = clockUntil(1000);
    const log = openSessionLog({ path, scheduler, flushMs: 1000 });
    log.tally('a', 2, (n) => `{"a":${n}}`);
    log.append('{"line":1}');
    log.tally('b', 1, (n) => `{"b":${n}}`);
    log.tally('a', 5, (n) => `{"other":${n}}`);
    scheduler.flush();
    log.tally('a', 1, (n) => `{"a":${n}}`);
    log.close();
    expect(await readFile(path, 'utf8')).toBe('{"line":1}\n{"a":7}\n{"b":1}\n{"a":1}\n');
    expect(log.linesWritten).toBe(4);
  });

  it('takes the next free name when asked and the name is taken, so two sessions never share a default log', async () => {
    const path = join(await dir(), 'sessions', '2026-12-02T07-00-00Z.ndjson');
    const first = openSessionLog({ path, nextFreeName: true });
    const second = openSessionLog({ path, nextFreeName: true });
    const third = openSessionLog({ path, nextFreeName: true });
    expect([first.path, second.path, third.path]).toEqual([path, path.replace(/\.ndjson$/, '-2.ndjson'), path.replace(/\.ndjson$/, '-3.ndjson')]);
    for (const log of [first, second, third]) {
      log.append('{"a":1}');
      log.close();
      expect(log.complete).toBe(true);
      expect(await readFile(log.path, 'utf8')).toBe('{"a":1}\n');
    }
  });

  it('holds lines at most one flush interval, then writes them whole and in order', async () => {
    const path = join(await dir(), 'log.ndjson');
    const scheduler = clockUntil(1000);
    const log = openSessionLog({ path, scheduler, flushMs: 1000 });
    log.append('{"a":1}');
    log.append('{"b":2}');
    expect(await readFile(path, 'utf8')).toBe('');
    scheduler.flush();
    expect(await readFile(path, 'utf8')).toBe('{"a":1}\n{"b":2}\n');
    log.append('{"c":3}');
    log.close();
    expect(await readFile(path, 'utf8')).toBe('{"a":1}\n{"b":2}\n{"c":3}\n');
    expect(log.linesWritten).toBe(3);
  });

  it('writes at once when much is queued, without waiting for the timer', async () => {
    const path = join(await dir(), 'log.ndjson');
    const log = openSessionLog({ path, scheduler: clockUntil(0), maxQueuedBytes: 100 });
    for (let i = 0; i < 20; i++) log.append(`{"i":${i}}`);
    expect((await readFile(path, 'utf8')).split('\n').length).toBeGreaterThan(10);
    log.close();
    log.close();
    expect((await readFile(path, 'utf8')).trimEnd().split('\n')).toHaveLength(20);
  });

  it('never appends to a log that exists: the session goes on and the log says it is incomplete', async () => {
    const path = join(await dir(), 'log.ndjson');
    await writeFile(path, '{"old":1}\n');
    const problems: string[] = [];
    const log = openSessionLog({ path, onProblem: (m) => problems.push(m) });
    log.append('{"new":1}');
    log.close();
    expect(await readFile(path, 'utf8')).toBe('{"old":1}\n');
    expect(log.complete).toBe(false);
    expect(log.linesLost).toBe(1);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/could not be opened \(EEXIST: the file exists already.*give a new name with --log\).*INCOMPLETE/);
  });

  it('says once, loudly, when a part of the path is a file, and keeps accepting lines', async () => {
    const d = await dir();
    await writeFile(join(d, 'file'), '');
    const problems: string[] = [];
    const log = openSessionLog({ path: join(d, 'file', 'log.ndjson'), onProblem: (m) => problems.push(m) });
    expect(() => log.append('{"a":1}')).not.toThrow();
    log.flush();
    log.close();
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/ENOTDIR/);
  });

  it.runIf(existsSync('/dev/full'))('on a full disk, stops writing, says so once, and reports the log incomplete', () => {
    const problems: string[] = [];
    const log = openSessionLog({ path: '/dev/full', exclusive: false, scheduler: clockUntil(0), onProblem: (m) => problems.push(m) });
    log.append('{"a":1}');
    log.flush();
    log.append('{"b":2}');
    log.flush();
    log.close();
    expect(log.complete).toBe(false);
    expect(log.linesLost).toBe(2);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/could not be written \(ENOSPC: the disk is full; free some space\).*INCOMPLETE/);
  });

  it('clears its flush timer on close', () => {
    const scheduler = clockUntil(10_000);
    const log = openSessionLog({ path: '/dev/null', exclusive: false, scheduler });
    log.close();
    expect(scheduler.actions.filter((a) => !a.closed)).toHaveLength(0);
  });
});

describe('defaultLogPath', () => {
  it('names the log after the UTC date and time under sessions/', () => {
    expect(defaultLogPath('/data', Date.UTC(2026, 11, 1, 22, 5, 9))).toBe(join('/data', 'sessions', '2026-12-01T22-05-09Z.ndjson'));
  });
});
