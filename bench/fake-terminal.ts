/** A terminal that is not there: Ink renders into it as into a real one, and the frames are counted, not kept. */
import { EventEmitter } from 'node:events';

export class FakeStdout extends EventEmitter {
  readonly isTTY = true;
  columns = 120;
  rows = 40;
  frames = 0;
  bytes = 0;
  write = (chunk: string | Uint8Array): boolean => {
    this.frames++;
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
