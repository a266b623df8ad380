/** Every command's option parsing, said once: node:util parseArgs with -h/--help, and the messages on failure. */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import type { CommandIo } from '../run/io.ts';

type Options = NonNullable<ParseArgsConfig['options']>;
const HELP_OPTION = { help: { type: 'boolean', short: 'h', default: false } } as const;
type WithHelp<O extends Options> = O & typeof HELP_OPTION;
export type ParsedCommandArgs<O extends Options> = ReturnType<typeof parseArgs<{ args: string[]; allowPositionals: true; options: WithHelp<O> }>>;

/** The part of parseArgs' tokens this reads. */
interface Token {
  readonly kind: string;
  readonly name?: string;
  readonly value?: string | undefined;
}

/** Options that take one value but were given more than once, each said with the values given. */
function repeatedOptions(tokens: readonly Token[], options: Options): string[] {
  const given = new Map<string, string[]>();
  for (const t of tokens) {
    if (t.kind !== 'option' || t.name === undefined || options[t.name]?.multiple === true) continue;
    const values = given.get(t.name) ?? [];
    values.push(t.value ?? '');
    given.set(t.name, values);
  }
  const out: string[] = [];
  for (const [name, values] of given) {
    if (values.length < 2) continue;
    const isSwitch = values.every((v) => v === '');
    const shown = isSwitch ? '' : ` (${values.map((v) => JSON.stringify(v)).join(', ')}); it takes one value`;
    out.push(`--${name} was given ${values.length} times${shown}: give it once`);
  }
  return out;
}

/**
 * Parses `argv` against a command's options (plus -h/--help); positionals are refused when
 * `allowPositionals` is false, and so is an option that takes one value given more than once. Returns the parsed values, or the exit
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
  let repeated: string[];
  try {
    const withTokens = parseArgs({ args: [...argv], allowPositionals, tokens: true, options: { ...options, ...HELP_OPTION } });
    repeated = repeatedOptions(withTokens.tokens as readonly Token[], options);
    parsed = withTokens as unknown as ParsedCommandArgs<O>;
  } catch (error) {
    io.err(`lengthwise ${command}: ${(error as Error).message}\n\n${help}`);
    return 2;
  }
  if (repeated.length > 0) {
    // An option that takes one value, given twice, would otherwise keep its last value silently.
    io.err(`${repeated.map((r) => `lengthwise ${command}: ${r}`).join('\n')}\n(lengthwise ${command} --help for the usage)`);
    return 2;
  }
  if ((parsed.values as { help?: boolean }).help === true) {
    io.out(help);
    return 0;
  }
  return parsed;
}
