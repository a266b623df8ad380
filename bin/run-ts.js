#!/usr/bin/env node
// Runs a repository script written in TypeScript (generators, benchmarks) through tsx's loader.
import { register } from 'tsx/esm/api';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { resolve } from 'node:path';

// Scripts (benchmarks above all) measure what users run, set up as bin/lengthwise.js sets it up:
// React's production build.
process.env.NODE_ENV ??= 'production';

// The project's own compiler settings (JSX above all), wherever the command is run from: tsx would
// otherwise look for a tsconfig.json in the working folder.
register({ tsconfig: fileURLToPath(new URL('../tsconfig.json', import.meta.url)) });
const [script, ...rest] = process.argv.slice(2);
if (script === undefined) {
  console.error('run-ts: give the script to run, e.g. node bin/run-ts.js replays/make-replays.ts');
  process.exit(2);
}
process.argv = [process.argv[0] ?? 'node', resolve(script), ...rest];
await import(pathToFileURL(resolve(script)).href);
