#!/usr/bin/env node
// Runs the TypeScript sources through tsx's loader, so a fresh `npm install` needs no build step.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../src/cli.ts');
const code = await main(process.argv.slice(2));
process.exitCode = code;
