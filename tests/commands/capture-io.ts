/** A CommandIo that keeps what a command says, for tests; the streams are real PassThrough streams. */
import { PassThrough } from 'node:stream';
import type { CommandIo } from '../../src/commands/io.ts';

export interface CapturedIo {
  readonly io: CommandIo;
  readonly out: () => string;
  readonly err: () => string;
}

export function captureIo(): CapturedIo {
  const out: string[] = [];
  const err: string[] = [];
  const io: CommandIo = {
    out: (text) => out.push(text.endsWith('\n') ? text : `${text}\n`),
    err: (text) => err.push(text.endsWith('\n') ? text : `${text}\n`),
    stdout: new PassThrough() as unknown as NodeJS.WriteStream,
    stderr: new PassThrough() as unknown as NodeJS.WriteStream,
    stdin: new PassThrough() as unknown as NodeJS.ReadStream,
    env: {},
  };
  return { io, out: () => out.join(''), err: () => err.join('') };
}
