/**
 * `lengthwise simulate`: a simulated device, to try live mode with no hardware. Serves (--listen) or
 * pushes (--connect) the synthetic gait stream of src/sim/ in real time, optionally with faults.
 */
import type { CommandIo } from '../run/io.ts';
import { parseOptions } from './parse-command-args.ts';
import { SETTINGS_OPTION, settingsOption } from './option-files.ts';
import { redactUrl } from '../../adapters/redact-url.ts';
import { parseConnect, parseDuration, parseListen, type ListenAddress, type Parsed } from './option-values.ts';
import { SCENARIOS, type Scenario } from '../sim/gait-generator.ts';
import {
  pushSimulator,
  SimulatorError,
  startSimulator,
  type RunningSimulator,
  type SimulatorOptions,
  type SimulatorStats,
} from '../sim/simulator.ts';

const USAGE = `usage: lengthwise simulate --listen [HOST:]PORT | --connect URL [options]

Sends a synthetic gait stream (lengthwise-stream version 1, one JSON array of records per 40 ms) in real
time, as a device would. Everything it sends is invented by the generator; nothing is recorded data.

  --listen [HOST:]PORT   serve the stream on a WebSocket (host 127.0.0.1 unless given; port 0 picks a free one);
                         every client that connects gets the header, then the stream from that moment
  --connect URL          push the stream to a WebSocket server (ws://… or wss://…), e.g. one started by
                         \`lengthwise live --listen PORT\`; reconnects whenever the connection ends
  --token T              --connect: send "Authorization: Bearer T" (for a server started with --token T);
                         a server that refuses the connection (401) is said with its reason, and pushing stops
  --scenario walk|run    treadmill walking (stride 1.1 s) or running (stride 0.72 s)   [default: walk]
  --rate HZ              samples per second per muscle, 1–2000                        [default: 100]
  --muscles A,B          muscle names; the first gets a calf-like trajectory, the second a thigh-like one
                                                                                      [default: calf,thigh]
  --faults               also send malformed messages, drop connections, restart the device (header again,
                         clock jumps ahead), jump the clock, stall then burst, and lose tracking now and then;
                         one line on stderr per fault
  --duration S           stop after S seconds                         [default: until Ctrl-C or SIGTERM]
  --seed N               seed of the generator (same seed, same stream)              [default: 1]
  --settings FILE        processing settings (lengthwise-settings JSON): with --faults, the header that
                         declares too many muscles declares max_muscles_per_trial + 1
  -h, --help             this help

examples:
  lengthwise simulate --listen 8765
  lengthwise simulate --connect ws://127.0.0.1:8765 --scenario run --faults --duration 60`;

type SimulateArgs =
  | { readonly ok: true; readonly help: true }
  | {
      readonly ok: true;
      readonly help: false;
      readonly listen: ListenAddress | null;
      readonly connect: string | null;
      readonly token: string | null;
      readonly settings: string | undefined;
      readonly sim: SimulatorOptions;
    }
  | { readonly ok: false; readonly problems: readonly string[] };

function numberOption(
  raw: string | undefined,
  name: string,
  accepted: string,
  valid: (n: number) => boolean,
  problems: string[],
): number | undefined {
  if (raw === undefined) return undefined;
  const n = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(n) || !valid(n)) {
    problems.push(`--${name} "${raw}": give ${accepted}`);
    return undefined;
  }
  return n;
}

export function parseSimulateArgs(argv: readonly string[]): SimulateArgs {
  const result = parseOptions(argv, {
    listen: { type: 'string' },
    connect: { type: 'string' },
    scenario: { type: 'string' },
    rate: { type: 'string' },
    muscles: { type: 'string' },
    faults: { type: 'boolean' },
    duration: { type: 'string' },
    seed: { type: 'string' },
    token: { type: 'string' },
    ...SETTINGS_OPTION,
  }, { allowPositionals: false });
  if (!result.ok) return { ok: false, problems: [`${result.message}\n(lengthwise simulate --help lists every option)`] };
  const { values } = result.parsed;
  if (values.help === true) return { ok: true, help: true };
  const problems: string[] = [];
  const value = <T>(parsed: Parsed<T> | null): T | null => {
    if (parsed === null) return null;
    if (parsed.ok) return parsed.value;
    problems.push(parsed.message);
    return null;
  };
  const listen = value(values.listen === undefined ? null : parseListen(values.listen));
  // The address as given: it is what the simulator says it pushes to.
  const connect = values.connect !== undefined && value(parseConnect(values.connect)) !== null ? values.connect : null;
  if ((values.listen === undefined) === (values.connect === undefined)) {
    problems.push('give exactly one of --listen [HOST:]PORT (serve the stream) or --connect URL (push it to a server)');
  }
  if (values.token !== undefined && values.connect === undefined) problems.push('--token is for --connect (the token the server asks for)');
  if (values.token === '') problems.push('--token is empty: give the token the server asks for');
  let scenario: Scenario | undefined;
  if (values.scenario !== undefined) {
    if ((SCENARIOS as readonly string[]).includes(values.scenario)) scenario = values.scenario as Scenario;
    else problems.push(`--scenario "${values.scenario}": give one of ${SCENARIOS.join(', ')}`);
  }
  const rateHz = numberOption(values.rate, 'rate', 'samples per second, 1–2000', (n) => n >= 1 && n <= 2000, problems);
  const durationS = value(values.duration === undefined ? null : parseDuration(values.duration)) ?? undefined;
  const seed = numberOption(values.seed, 'seed', 'a whole number, e.g. --seed 7', (n) => Number.isInteger(n), problems);
  let muscles: string[] | undefined;
  if (values.muscles !== undefined) {
    muscles = values.muscles.split(',').map((m) => m.trim());
    if (muscles.some((m) => m.length === 0)) problems.push(`--muscles "${values.muscles}": give names separated by commas, e.g. --muscles calf,thigh`);
    else if (new Set(muscles).size !== muscles.length) problems.push(`--muscles "${values.muscles}": give each muscle once`);
    else if (muscles.length > 16) problems.push(`--muscles: give at most 16 muscles (got ${muscles.length})`);
  }
  if (problems.length > 0) return { ok: false, problems };
  const sim: SimulatorOptions = {
    ...(scenario === undefined ? {} : { scenario }),
    ...(rateHz === undefined ? {} : { rateHz }),
    ...(durationS === undefined ? {} : { durationS }),
    ...(seed === undefined ? {} : { seed }),
    ...(muscles === undefined ? {} : { muscles }),
    faults: values.faults === true,
  };
  return { ok: true, help: false, listen, connect, token: values.token ?? null, settings: values.settings, sim };
}

function summaryLine(s: Readonly<SimulatorStats>): string {
  const bad = Object.values(s.badSent).reduce((a, b) => a + (b ?? 0), 0);
  const faults = Object.entries(s.faults).map(([k, n]) => `${k} ×${n}`);
  return (
    `simulate: sent ${s.samplesSent} samples, ${s.eventsSent} gait events, ${s.markersSent} markers, ` +
    `${s.headersSent} headers and ${bad} malformed messages in ${s.messagesSent} messages over ${s.connections} connection` +
    `${s.connections === 1 ? '' : 's'}` +
    (faults.length > 0 ? `; faults: ${faults.join(', ')}` : '') +
    (s.samplesDropped > 0 ? `; ${s.samplesDropped} samples dropped for a slow receiver` : '')
  );
}

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseSimulateArgs(argv);
  if (!parsed.ok) {
    io.err(parsed.problems.map((p) => `lengthwise simulate: ${p}`).join('\n'));
    return 2;
  }
  if (parsed.help) {
    io.out(USAGE);
    return 0;
  }
  const settings = await settingsOption('simulate', parsed.settings, io);
  if (!settings.ok) return 2;
  const simOptions: SimulatorOptions = { ...parsed.sim, maxMuscles: settings.value.max_muscles_per_trial };
  const log = (line: string): void => io.err(line);
  let sim: RunningSimulator;
  try {
    sim =
      parsed.listen !== null
        ? await startSimulator({ ...simOptions, host: parsed.listen.host, port: parsed.listen.port, log })
        : await pushSimulator({
            ...simOptions,
            url: parsed.connect as string,
            shownUrl: redactUrl(parsed.connect as string),
            ...(parsed.token !== null ? { token: parsed.token } : {}),
            log,
          });
  } catch (error) {
    if (error instanceof SimulatorError) {
      io.err(`lengthwise simulate: ${error.message}`);
      return 1;
    }
    throw error;
  }
  const what = `${parsed.sim.scenario ?? 'walk'} stream (${(parsed.sim.muscles ?? ['calf', 'thigh']).join(', ')} at ${parsed.sim.rateHz ?? 100} Hz${parsed.sim.faults === true ? ', with faults' : ''})`;
  io.out(parsed.listen !== null ? `serving a synthetic ${what} on ${sim.url}` : `pushing a synthetic ${what} to ${sim.url}`);
  if (parsed.sim.durationS === undefined) io.err('simulate: Ctrl-C stops it');

  const onSignal = (signal: NodeJS.Signals): void => {
    io.err(`simulate: ${signal} received, closing connections`);
    void sim.stop();
  };
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);
  try {
    await sim.done;
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
  io.err(summaryLine(sim.stats));
  if (sim.refusal !== null) {
    const hint = /^.* refused the connection: HTTP 401\b/.test(sim.refusal)
      ? parsed.token === null
        ? '; give the server\'s token with --token T'
        : '; check that --token is the server\'s token'
      : '';
    io.err(`lengthwise simulate: ${sim.refusal}${hint}`);
    return 1;
  }
  if (parsed.connect !== null && sim.stats.connections === 0) {
    io.err(`lengthwise simulate: never connected to ${sim.url}; check that a server listens there (e.g. lengthwise live --listen PORT)`);
    return 1;
  }
  return 0;
}
