#!/usr/bin/env node
// Runs the TypeScript sources through tsx's loader, so a fresh `npm install` needs no build step.
import { setFlagsFromString } from 'node:v8';
import { register } from 'tsx/esm/api';
import { fileURLToPath } from 'node:url';

// React's development build costs the dashboard about 1.7 times the CPU; users get the production one.
process.env.NODE_ENV ??= 'production';
// In some processes V8 starts allocating the replay's short-lived objects as long-lived (allocation-site
// pretenuring), which makes a replay some 25% slower; see bench/README.md.
setFlagsFromString('--no-allocation-site-pretenuring');

// The project's own compiler settings (JSX above all), wherever the command is run from: tsx would
// otherwise look for a tsconfig.json in the working folder.
register({ tsconfig: fileURLToPath(new URL('../tsconfig.json', import.meta.url)) });
const { main } = await import('../src/cli.ts');
const code = await main(process.argv.slice(2));
process.exitCode = code;
