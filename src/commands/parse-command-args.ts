/** Every command's option parsing, said once: node:util parseArgs with -h/--help, and the messages on failure. */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import type { CommandIo } from '../run/io.ts';

type Options = NonNullable<ParseArgsConfig['options']>;
const HELP_OPTION = { help: { type: 'boolean', short: 'h', default: false } } as const;
type WithHelp<O extends Options> = O & typeof HELP_OPTION;
export type ParsedCommandArgs<O extends Options> = ReturnType<typeof parseArgs<{ args: string[]; allowPositionals: true; options: WithHelp<O> }>>;

/**
 * Parses `argv` against a command's options (plus -h/--help); positionals are refused when
 * `allowPositionals` is false. Returns the parsed values, or the exit
 * status to end with: 0 after printing the help, 2 after saying what was wrong followed by the help.
 */
export function parseCommandArgs<const O extends Options>(
  command: string,
  help: string,
  argv: readonly string[],
  options: O,
  io: CommandIo,
  { allowPositionals = true }: { readonly allowPositionals?: boolean } = {},
): ParsedCommandArgs<O> | number {
  let parsed: ParsedCommandArgs<O>;
  try {
    parsed = parseArgs({ args: [...argv], allowPositionals, options: { ...options, ...HELP_OPTION } }) as ParsedCommandArgs<O>;
  } catch (error) {
    io.err(`lengthwise ${command}: ${(error as Error).message}\n\n${help}`);
    return 2;
  }
  if ((parsed.values as { help?: boolean }).help === true) {
    io.out(help);
    return 0;
  }
  return parsed;
}
