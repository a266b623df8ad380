/**
 * Every command's option parsing, said once: node:util parseArgs with -h/--help, negative numbers taken
 * as values, and messages that say what was wrong and the nearest option ("`--sped`: unknown option; did
 * you mean `--speed`?").
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { didYouMean } from '../../adapters/nearest-name.ts';
import type { CommandIo } from '../run/io.ts';

type Options = NonNullable<ParseArgsConfig['options']>;
const HELP_OPTION = { help: { type: 'boolean', short: 'h', default: false } } as const;
type WithHelp<O extends Options> = O & typeof HELP_OPTION;
export type ParsedCommandArgs<O extends Options> = ReturnType<typeof parseArgs<{ args: string[]; allowPositionals: true; options: WithHelp<O> }>>;

/** A value that starts with a dash and is still a value: a negative number (-1.5, -.5, -1-4, -2,3). */
const NEGATIVE_NUMBER = /^-\.?\d/;

/** "; did you mean `NAME`?" for a name near one of `accepted` (commands, options), else "". */
export { didYouMean };

export type OptionsParsed<O extends Options> = { readonly ok: true; readonly parsed: ParsedCommandArgs<O> } | { readonly ok: false; readonly message: string };

/**
 * An option that takes one value given more than once, said with the values given (null when none is):
 * it would otherwise keep its last value silently.
 */
function repeatedOptions(tokens: ReturnType<typeof parseArgs>['tokens'], options: Options): string | null {
  const given = new Map<string, string[]>();
  for (const t of tokens ?? []) {
    if (t.kind === 'option-terminator') break;
    if (t.kind !== 'option' || !Object.hasOwn(options, t.name) || options[t.name]?.multiple === true) continue;
    const values = given.get(t.name) ?? [];
    values.push(t.value ?? '');
    given.set(t.name, values);
  }
  for (const [name, values] of given) {
    if (values.length < 2) continue;
    const isSwitch = values.every((v) => v === '');
    const shown = isSwitch ? '' : ` (${values.map((v) => JSON.stringify(v)).join(', ')}); it takes one value`;
    return `\`--${name}\` was given ${values.length} times${shown}: give it once`;
  }
  return null;
}

/**
 * Parses `argv` against `options` (plus -h/--help). A string option takes the next argument as its value
 * when that is a negative number (`--time-offset -1.5`); any other argument starting with a dash is
 * never taken for a value. On a mistake, one message naming the argument, what was wrong and how to
 * fix it (the nearest option for an unknown one).
 */
export function parseOptions<const O extends Options>(
  argv: readonly string[],
  options: O,
  { allowPositionals = true }: { readonly allowPositionals?: boolean } = {},
): OptionsParsed<O> {
  const all: Options = { ...options, ...HELP_OPTION };
  const names = Object.keys(all).map((name) => `--${name}`);
  const { tokens } = parseArgs({ args: [...argv], options: all, allowPositionals: true, strict: false, tokens: true });
  const joined = new Set<number>();
  const args = [...argv];
  for (const token of tokens) {
    if (token.kind === 'option-terminator') break;
    if (token.kind === 'positional') {
      if (!allowPositionals) return { ok: false, message: `\`${token.value}\`: this command takes options only, no file or other argument` };
      continue;
    }
    const spec = Object.hasOwn(all, token.name) ? all[token.name] : undefined;
    if (spec === undefined) {
      return { ok: false, message: `\`${token.rawName}\`: unknown option${didYouMean(token.rawName.startsWith('--') ? token.rawName : `--${token.name}`, names)}` };
    }
    if (spec.type === 'boolean') {
      if (token.inlineValue === true) return { ok: false, message: `\`${token.rawName}\` takes no value (got \`${token.rawName}=${token.value ?? ''}\`): give \`${token.rawName}\` alone` };
      continue;
    }
    if (token.value === undefined) return { ok: false, message: `\`${token.rawName}\` needs a value: give \`${token.rawName} VALUE\`` };
    if (token.inlineValue === false && token.value.startsWith('-')) {
      if (!NEGATIVE_NUMBER.test(token.value)) {
        return {
          ok: false,
          message: `\`${token.rawName}\` needs a value, and \`${token.value}\` looks like an option: give \`${token.rawName} VALUE\`, or \`${token.rawName}=${token.value}\` for a value that starts with a dash`,
        };
      }
      // A negative number: said inline, so that parseArgs takes it as the value.
      args[token.index] = `${token.rawName}=${token.value}`;
      joined.add(token.index + 1);
    }
  }
  const repeated = repeatedOptions(tokens, all);
  if (repeated !== null) return { ok: false, message: repeated };
  try {
    const parsed = parseArgs({ args: args.filter((_, i) => !joined.has(i)), allowPositionals, options: all }) as ParsedCommandArgs<O>;
    return { ok: true, parsed };
  } catch (error) {
    return { ok: false, message: (error as Error).message };
  }
}

/**
 * Parses `argv` against a command's options (plus -h/--help); positionals are refused when
 * `allowPositionals` is false, and so is an option that takes one value given more than once. Returns the parsed
 * values, or the exit status to end with: 0 after printing the help, 2 after saying what was wrong and where to find the options.
 */
export function parseCommandArgs<const O extends Options>(
  command: string,
  help: string,
  argv: readonly string[],
  options: O,
  io: CommandIo,
  { allowPositionals = true }: { readonly allowPositionals?: boolean } = {},
): ParsedCommandArgs<O> | number {
  const result = parseOptions(argv, options, { allowPositionals });
  if (!result.ok) {
    io.err(`lengthwise ${command}: ${result.message}\n(lengthwise ${command} --help lists every option)`);
    return 2;
  }
  if ((result.parsed.values as { help?: boolean }).help === true) {
    io.out(help);
    return 0;
  }
  return result.parsed;
}
