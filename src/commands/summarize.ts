import type { CommandIo } from './io.ts';

export async function run(_argv: string[], io: CommandIo): Promise<number> {
  io.err('lengthwise summarize: this command is being built and is not available in this version.');
  return 2;
}
