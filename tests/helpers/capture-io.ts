/** A CommandIo that keeps what a command says, for command tests; its streams are real PassThrough streams. */
import { PassThrough } from 'node:stream';
import type { CommandIo } from '../../src/run/io.ts';

export interface CapturedIo {
  readonly io: CommandIo;
  /** Each call of io.out, as given. */
  readonly out: string[];
  /** Each call of io.err, as given. */
  readonly err: string[];
  /** Standard output as a terminal would show it: each call a line. */
  outText(): string;
  errText(): string;
}

const asLines = (calls: readonly string[]): string => calls.map((t) => (t.endsWith('\n') ? t : `${t}\n`)).join('');

export function captureIo(env: NodeJS.ProcessEnv = {}): CapturedIo {
  const out: string[] = [];
  const err: string[] = [];
  return {
    out,
    err,
    outText: () => asLines(out),
    errText: () => asLines(err),
    io: {
      out: (text) => out.push(text),
      err: (text) => err.push(text),
      stdout: new PassThrough() as unknown as NodeJS.WriteStream,
      stderr: new PassThrough() as unknown as NodeJS.WriteStream,
      stdin: new PassThrough() as unknown as NodeJS.ReadStream,
      env,
    },
  };
}
