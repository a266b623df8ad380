/**
 * The plain loop (plain-loop.ts) as a process of its own, the yardstick for the command as users run it.
 * bench/command.ts bundles this file into plain JavaScript first, as build.js does the command, so
 * neither process pays for a TypeScript loader.
 *
 * Usage: node plain-loop-process.mjs FILE csv|ndjson SARCOMERES_JSON   (prints the figures as JSON)
 */
import { plainLoop } from './plain-loop.ts';

const [path, format, sarcomeres] = process.argv.slice(2);
if (path === undefined || (format !== 'csv' && format !== 'ndjson') || sarcomeres === undefined) {
  console.error('plain-loop-process: give FILE, csv or ndjson, and the sarcomeres in series as JSON, e.g. {"calf":17500}');
  process.exit(2);
}
const figures = await plainLoop(path, { format, sarcomeresInSeries: JSON.parse(sarcomeres) as Record<string, number> });
process.stdout.write(`${JSON.stringify(figures)}\n`);
