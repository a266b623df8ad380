/** The `lengthwise` command: dispatches to one file per sub-command in src/commands/. */
import type { CommandIo } from './run/io.ts';

const COMMANDS = {
  replay: { summary: 'play a recorded trial (NDJSON or CSV) through the pipeline', load: () => import('./commands/replay.ts') },
  live: { summary: 'ingest a live stream over WebSocket (--connect URL or --listen PORT)', load: () => import('./commands/live.ts') },
  simulate: { summary: 'serve or push a synthetic gait stream, to try live mode with no hardware', load: () => import('./commands/simulate.ts') },
  inspect: { summary: 'say how a file will be read (layout, columns, units, sides, counts), without running it', load: () => import('./commands/inspect.ts') },
  calibrate: { summary: 'make a calibration from a quiet window of a trial', load: () => import('./commands/calibrate.ts') },
  curve: { summary: 'print the force–length model: force and region at given sarcomere lengths', load: () => import('./commands/curve.ts') },
  summarize: { summary: 'summarise many trials into a study table and a report', load: () => import('./commands/summarize.ts') },
} as const satisfies Record<string, { summary: string; load: () => Promise<{ run: (argv: string[], io: CommandIo) => Promise<number> }> }>;

type CommandName = keyof typeof COMMANDS;

function usage(): string {
  const rows = Object.entries(COMMANDS).map(([name, c]) => `  ${name.padEnd(10)} ${c.summary}`);
  return ['usage: lengthwise <command> [options]   (lengthwise <command> --help for its options)', '', 'commands:', ...rows].join('\n');
}

function isCommand(name: string): name is CommandName {
  return Object.hasOwn(COMMANDS, name);
}

export async function main(argv: readonly string[], io: CommandIo = processIo()): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    io.out(usage());
    return name === undefined ? 2 : 0;
  }
  if (!isCommand(name)) {
    io.err(`lengthwise: unknown command "${name}".\n\n${usage()}`);
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
