/** The `lengthwise` command: dispatches to one file per sub-command in src/commands/. */
import { readFileSync } from 'node:fs';
import type { CommandIo } from './run/io.ts';

const COMMANDS = {
  replay: { summary: 'play a recorded trial (NDJSON or CSV) through the pipeline', load: () => import('./commands/replay.ts') },
  live: { summary: 'ingest a live stream over WebSocket (--connect URL or --listen PORT)', load: () => import('./commands/live.ts') },
  simulate: { summary: 'serve or push a synthetic gait stream, to try live mode with no hardware', load: () => import('./commands/simulate.ts') },
  inspect: { summary: 'say how a file will be read (layout, columns, units, sides, counts), without running it', load: () => import('./commands/inspect.ts') },
  calibrate: { summary: 'make a calibration from a quiet window of a trial', load: () => import('./commands/calibrate.ts') },
  curve: { summary: 'print the force–length model: force and region at given sarcomere lengths', load: () => import('./commands/curve.ts') },
  summarize: { summary: 'summarize many trials, or a study of subjects and conditions, into tables and a report', load: () => import('./commands/summarize.ts') },
  settings: { summary: 'print every processing setting with its default, as a settings file (--explain: what each does)', load: () => import('./commands/settings.ts') },
} as const satisfies Record<string, { summary: string; load: () => Promise<{ run: (argv: string[], io: CommandIo) => Promise<number> }> }>;

type CommandName = keyof typeof COMMANDS;

function usage(): string {
  const rows = Object.entries(COMMANDS).map(([name, c]) => `  ${name.padEnd(10)} ${c.summary}`);
  return [
    'usage: lengthwise <command> [options]   (lengthwise help <command>, or lengthwise <command> --help, for its options)',
    '       lengthwise --version',
    '',
    'commands:',
    ...rows,
  ].join('\n');
}

/** The version in package.json: one folder above this module, in the sources (src/) as in the build (dist/). */
function version(): string {
  const text = readFileSync(new URL('../package.json', import.meta.url), 'utf8');
  return String((JSON.parse(text) as { version?: unknown }).version);
}

/** "; did you mean `NAME`?" for a near command; loaded only then, so --help and --version load no package. */
async function nearestCommand(given: string): Promise<string> {
  const { didYouMean } = await import('./commands/parse-command-args.ts');
  return didYouMean(given, Object.keys(COMMANDS));
}

function isCommand(name: string): name is CommandName {
  return Object.hasOwn(COMMANDS, name);
}

export async function main(argv: readonly string[], io: CommandIo = processIo()): Promise<number> {
  const [name, ...rest] = argv;
  if (name === '--version') {
    io.out(`lengthwise ${version()}`);
    return 0;
  }
  if (name === 'help' && rest.length > 0) {
    const [topic] = rest;
    if (topic !== undefined && isCommand(topic)) return main([topic, '--help'], io);
    io.err(`lengthwise help: unknown command "${topic}"${await nearestCommand(topic ?? '')}\n\n${usage()}`);
    return 2;
  }
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    io.out(usage());
    return name === undefined ? 2 : 0;
  }
  if (!isCommand(name)) {
    io.err(`lengthwise: unknown command "${name}"${await nearestCommand(name)}\n\n${usage()}`);
    return 2;
  }
  const mod = await COMMANDS[name].load();
  return mod.run(rest, io);
}

function processIo(): CommandIo {
  return {
    out: (text) => process.stdout.write(text.endsWith('\n') ? text : `${text}\n`),
    err: (text) => process.stderr.write(text.endsWith('\n') ? text : `${text}\n`),
    stdout: process.stdout,
    stderr: process.stderr,
    stdin: process.stdin,
    env: process.env,
  };
}
