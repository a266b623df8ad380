/**
 * A bench script's options (node:util's parseArgs, strict): a mistake on the command line ends the
 * script with exit code 2 and a message that names the script.
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';

type Options = NonNullable<ParseArgsConfig['options']>;

/** The options' values; on a mistake, says what it is and exits with 2. */
export function benchArgs<O extends Options>(program: string, argv: readonly string[], options: O): ReturnType<typeof parseArgs<{ options: O }>>['values'] {
  try {
    return parseArgs({ args: [...argv], options }).values;
  } catch (error) {
    console.error(`${program}: ${error instanceof Error ? error.message : String(error)}`);
    return process.exit(2);
  }
}

/** An option's whole number above 0, `fallback` when it is not given; anything else ends the script with 2. */
export function wholeNumber(program: string, name: string, given: string | undefined, fallback: number): number {
  const n = given === undefined ? fallback : Number(given);
  if (!Number.isInteger(n) || n <= 0) {
    console.error(`${program}: --${name} takes a whole number above 0 (got ${given})`);
    process.exit(2);
  }
  return n;
}
