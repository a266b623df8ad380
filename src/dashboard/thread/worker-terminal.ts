/**
 * The terminal as Ink sees it on the dashboard's own thread: a screen that writes straight to the
 * terminal's file descriptor (a worker's process.stdout would pass every frame back through the main
 * thread), and keys that the main thread reads and passes on (only the main thread can put a terminal
 * in raw mode).
 */
import { EventEmitter } from 'node:events';
import { writeSync } from 'node:fs';

/** Blocks this thread briefly, for a terminal that cannot take more bytes yet. */
function pause(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

export class FdScreen extends EventEmitter {
  readonly isTTY = true;
  constructor(
    private readonly fd: number,
    public columns: number,
    public rows: number,
  ) {
    super();
  }

  write = (data: string): boolean => {
    const bytes = Buffer.from(data, 'utf8');
    for (let done = 0; done < bytes.length; ) {
      try {
        done += writeSync(this.fd, bytes, done, bytes.length - done);
      } catch (error) {
        // A non-blocking terminal that is full says EAGAIN: wait for it rather than drop part of a frame.
        if ((error as NodeJS.ErrnoException).code !== 'EAGAIN') throw error;
        pause(2);
      }
    }
    return true;
  };

  resize(columns: number, rows: number): void {
    this.columns = columns;
    this.rows = rows;
    this.emit('resize');
  }
}

/** Standard input as Ink reads it ('readable', then read() until null), fed by `push`. */
export class ForwardedKeys extends EventEmitter {
  private data: string | null = null;
  constructor(readonly isTTY: boolean) {
    super();
  }
  push(data: string): void {
    this.data = (this.data ?? '') + data;
    this.emit('readable');
  }
  read = (): string | null => {
    const { data } = this;
    this.data = null;
    return data;
  };
  setEncoding(): this {
    return this;
  }
  // Raw mode is the main thread's: it set it before the keys were passed on.
  setRawMode(): this {
    return this;
  }
  resume(): this {
    return this;
  }
  pause(): this {
    return this;
  }
  ref(): this {
    return this;
  }
  unref(): this {
    return this;
  }
}
