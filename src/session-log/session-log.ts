/**
 * The crash-safe session log: lines appended in received order, written to the file at least once
 * every `flushMs` (and whenever enough is queued), and on close (with fsync). Whole lines only: after a
 * kill at most the last flush interval is lost and the file is still a valid replay file.
 *
 * A failed write (disk full, the file gone) never stops ingestion: the log says so once through
 * `onProblem`, cuts the file back to its last whole line, stops writing, and reports `complete: false`.
 */
import { closeSync, fsyncSync, ftruncateSync, mkdirSync, openSync, writeSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { asyncScheduler, interval, type SchedulerLike, type Subscription } from 'rxjs';

export interface SessionLogOptions {
  readonly path: string;
  /** Flush timer. @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
  /** Longest time a line waits in memory, ms. @default 1000 */
  readonly flushMs?: number;
  /** Queued bytes that trigger a write at once. @default 262144 */
  readonly maxQueuedBytes?: number;
  /** Refuse a file that exists already (a new session never appends to an old log). @default true */
  readonly exclusive?: boolean;
  /**
   * When the file exists already, take the first free name of `NAME-2.ndjson`, `NAME-3.ndjson`, … instead
   * (for default names, so two sessions started in the same second never share one). @default false
   */
  readonly nextFreeName?: boolean;
  /** Said once, when the log stops being complete. */
  readonly onProblem?: (message: string) => void;
}

export interface SessionLog {
  readonly path: string;
  /** False once a line could not be written (or the file never opened). */
  readonly complete: boolean;
  /** What went wrong, for the screen and the summary; null while complete. */
  readonly problem: string | null;
  /** Lines written to the file so far. */
  readonly linesWritten: number;
  /** Lines that could not be written. */
  readonly linesLost: number;
  /** Queues one line (without its line ending). */
  append(line: string): void;
  /**
   * Adds `count` to a tally kept until the next write, which then writes one line for it: `line(total)`,
   * as given by the first call with this key since the last write. Many like things received within a
   * write (rejections of one reason) are one line.
   */
  tally(key: string, count: number, line: (total: number) => string): void;
  /** Writes the queued lines now. */
  flush(): void;
  /** Flushes, syncs and closes the file; idempotent. */
  close(): void;
}

/** Names tried after the given one when it is taken (nextFreeName). */
const MAX_NAME_TRIES = 1000;

/** The default log path: sessions/<UTC date-time>.ndjson under `dir` (with nextFreeName, -2, -3, … when taken). */
export function defaultLogPath(dir: string, nowMs: number): string {
  const stamp = new Date(nowMs).toISOString().slice(0, 19).replace(/:/g, '-');
  return join(dir, 'sessions', `${stamp}Z.ndjson`);
}

function hint(code: string): string {
  switch (code) {
    case 'ENOSPC':
      return 'the disk is full; free some space';
    case 'EDQUOT':
      return 'the disk quota is used up';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied; choose a writable folder with --log';
    case 'EEXIST':
      return 'the file exists already; a session log is never appended to: give a new name with --log';
    case 'ENOTDIR':
      return 'a part of the path is a file, not a folder; choose another path with --log';
    case 'EROFS':
      return 'the file system is read-only; choose another path with --log';
    default:
      return 'check the path given with --log and the disk';
  }
}

class FileSessionLog implements SessionLog {
  complete = true;
  problem: string | null = null;
  linesWritten = 0;
  linesLost = 0;
  private fd: number | null = null;
  private queue: string[] = [];
  private queuedBytes = 0;
  private tallies = new Map<string, { total: number; readonly line: (total: number) => string }>();
  private goodBytes = 0;
  private timer: Subscription | null = null;
  private closed = false;

  constructor(
    public path: string,
    private readonly options: SessionLogOptions,
  ) {
    try {
      mkdirSync(dirname(path), { recursive: true });
    } catch (error) {
      // mkdir says EEXIST when a part of the folder path is a file.
      const code = (error as NodeJS.ErrnoException).code;
      this.fail(code === 'EEXIST' ? { code: 'ENOTDIR' } : error, 'could not be opened');
      return;
    }
    const exclusive = options.exclusive !== false;
    for (let n = 1; ; n++) {
      try {
        this.fd = openSync(this.path, exclusive ? 'wx' : 'a');
        break;
      } catch (error) {
        if (exclusive && options.nextFreeName === true && (error as NodeJS.ErrnoException).code === 'EEXIST' && n < MAX_NAME_TRIES) {
          this.path = `${path.replace(/\.ndjson$/, '')}-${n + 1}.ndjson`;
          continue;
        }
        this.fail(error, 'could not be opened');
        return;
      }
    }
    this.timer = interval(options.flushMs ?? 1000, options.scheduler ?? asyncScheduler).subscribe(() => this.flush());
  }

  private fail(error: unknown, what: string): void {
    const code = (error as NodeJS.ErrnoException).code ?? 'EUNKNOWN';
    this.complete = false;
    this.linesLost += this.queue.length + this.tallies.size;
    this.queue = [];
    this.queuedBytes = 0;
    this.tallies.clear();
    this.problem =
      `session log ${this.path} ${what} (${code}: ${hint(code)}); ingestion goes on without it, ` +
      `the log holds ${this.linesWritten} lines and is INCOMPLETE`;
    if (this.fd !== null) {
      const fd = this.fd;
      this.fd = null;
      try {
        // Back to the last whole line, so the file stays a valid replay file.
        ftruncateSync(fd, this.goodBytes);
      } catch {
        // Nothing more can be done with this file.
      }
      try {
        closeSync(fd);
      } catch {
        // Already unusable.
      }
    }
    this.timer?.unsubscribe();
    this.timer = null;
    this.options.onProblem?.(this.problem);
  }

  append(line: string): void {
    if (this.fd === null) {
      this.linesLost++;
      return;
    }
    this.queue.push(line);
    this.queuedBytes += line.length;
    if (this.queuedBytes >= (this.options.maxQueuedBytes ?? 256 * 1024)) this.flush();
  }

  tally(key: string, count: number, line: (total: number) => string): void {
    if (this.fd === null) {
      this.linesLost++;
      return;
    }
    const entry = this.tallies.get(key);
    if (entry === undefined) this.tallies.set(key, { total: count, line });
    else entry.total += count;
  }

  flush(): void {
    if (this.fd === null) return;
    if (this.tallies.size > 0) {
      for (const entry of this.tallies.values()) this.queue.push(entry.line(entry.total));
      this.tallies.clear();
    }
    if (this.queue.length === 0) return;
    const lines = this.queue;
    const buffer = Buffer.from(`${lines.join('\n')}\n`, 'utf8');
    this.queue = [];
    this.queuedBytes = 0;
    try {
      let offset = 0;
      while (offset < buffer.length) offset += writeSync(this.fd, buffer, offset, buffer.length - offset);
    } catch (error) {
      this.linesLost += lines.length;
      this.fail(error, 'could not be written');
      return;
    }
    this.goodBytes += buffer.length;
    this.linesWritten += lines.length;
  }

  close(): void {
    if (this.closed) return;
    this.closed = true;
    this.flush();
    this.timer?.unsubscribe();
    this.timer = null;
    if (this.fd === null) return;
    const fd = this.fd;
    this.fd = null;
    try {
      fsyncSync(fd);
    } catch {
      // Some files (pipes, /dev/*) cannot be synced; the lines are written.
    }
    try {
      closeSync(fd);
    } catch (error) {
      this.fail(error, 'could not be closed');
    }
  }
}

/** Opens (creates) the log; never throws: a log that cannot be opened is incomplete from the start. */
export function openSessionLog(options: SessionLogOptions): SessionLog {
  return new FileSessionLog(options.path, options);
}
