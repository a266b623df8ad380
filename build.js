#!/usr/bin/env node
// Builds the TypeScript sources into dist/, the plain JavaScript that bin/lengthwise.js and the worker
// threads run: `npm install` runs it (the prepare script), and so do the tests before they start.
//
// esbuild bundles the three entry points (the command, the screen's thread, a study's trial thread),
// with packages left as imports from node_modules. Each dynamic import of the sources (one per
// sub-command, the dashboard, the report) stays a chunk of its own, loaded only when it is reached,
// so `lengthwise --help` loads one small file and no heavy package. Every file lands flat in dist/,
// so a module finds its worker's file beside itself, whichever chunk it ends up in.
//
// Only files whose bytes changed are written, and files of an earlier build that this one did not
// make are removed: a command already running from dist/ keeps finding the chunks it loads later.
import { build } from 'esbuild';
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { basename, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('.', import.meta.url));

/** The built files other code names: bin/lengthwise.js loads the first, the Worker constructors the others. */
export const ENTRY_POINTS = {
  cli: 'src/cli.ts',
  'dashboard-worker': 'src/dashboard/thread/dashboard-worker.tsx',
  'study-worker': 'src/study/study-worker.ts',
};

/**
 * Builds dist/ (or outDir) from the sources; resolves with what changed.
 * @param {{ outDir?: string }} [options]
 * @returns {Promise<{ outDir: string, written: number, removed: number, files: number }>}
 */
export async function buildDist(options = {}) {
  const outDir = options.outDir ?? join(ROOT, 'dist');
  const result = await build({
    absWorkingDir: ROOT,
    entryPoints: Object.entries(ENTRY_POINTS).map(([out, source]) => ({ in: source, out })),
    outdir: outDir,
    bundle: true,
    splitting: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    packages: 'external',
    tsconfig: join(ROOT, 'tsconfig.json'),
    chunkNames: '[name]-[hash]',
    sourcemap: 'linked',
    write: false,
    logLevel: 'warning',
  });
  mkdirSync(outDir, { recursive: true });
  const made = new Set();
  let written = 0;
  for (const file of result.outputFiles) {
    const name = basename(file.path);
    made.add(name);
    let before = null;
    try {
      before = readFileSync(file.path);
    } catch {
      // Not there yet.
    }
    if (before === null || !before.equals(file.contents)) {
      writeFileSync(file.path, file.contents);
      written++;
    }
  }
  let removed = 0;
  for (const name of readdirSync(outDir)) {
    if (!made.has(name)) {
      rmSync(join(outDir, name), { recursive: true, force: true });
      removed++;
    }
  }
  return { outDir, written, removed, files: made.size };
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === resolve(process.argv[1])) {
  const t0 = performance.now();
  const { outDir, written, removed, files } = await buildDist();
  const ms = Math.round(performance.now() - t0);
  console.log(`build: ${files} files in ${outDir} (${written} written, ${removed} removed) in ${ms} ms`);
}
