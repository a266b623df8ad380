/** A terminal that is not there: Ink renders into it as into a real one, and the frames are counted, not kept. */
import { EventEmitter } from 'node:events';

/** Ink brackets each frame on a terminal with these (synchronized output), as writes of their own. */
export const BEGIN_SYNC = '\u001B[?2026h';
const END_SYNC = '\u001B[?2026l';

export class FakeStdout extends EventEmitter {
  readonly isTTY = true;
  /** Set to a file's descriptor, the dashboard draws on its own thread into that file. */
  fd: number | undefined = undefined;
  columns = 120;
  rows = 40;
  /** Screen updates: writes other than the synchronized-output brackets alone. */
  frames = 0;
  /** Every write, the brackets included. */
  writes = 0;
  bytes = 0;
  /** A 256-colour terminal: the screen's thread is told so and draws in colour, as on most terminals. */
  getColorDepth(): number {
    return 8;
  }
  write = (chunk: string | Uint8Array): boolean => {
    this.writes++;
    if (chunk !== BEGIN_SYNC && chunk !== END_SYNC) this.frames++;
    this.bytes += chunk.length;
    return true;
  };
}

export class FakeStdin extends EventEmitter {
  readonly isTTY = true;
  read = (): null => null;
  setEncoding(): void {}
  setRawMode(): void {}
  resume(): void {}
  pause(): void {}
  ref(): void {}
  unref(): void {}
}
