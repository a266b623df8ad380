/**
 * The tree's imports go one way, along the data's path: each folder may import only from the folders
 * listed for it below (and from itself), and no file imports itself back through others. The graph is
 * read from the sources with TypeScript's own pre-processor, static and dynamic imports alike.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

const ROOT = join(import.meta.dirname, '..');

/** Folder → the folders it may import from. The longest matching folder of a file is its own. */
const MAY_IMPORT: Readonly<Record<string, readonly string[]>> = {
  'src/model': [],
  'src/trial': ['src/model'],
  adapters: ['src/trial', 'src/model'],
  'src/pipeline': ['src/trial', 'src/model'],
  'src/output': ['src/trial', 'src/model'],
  'src/report': ['src/output', 'src/trial', 'src/model'],
  'src/sim': ['adapters', 'src/trial', 'src/model'],
  'src/session-log': ['adapters', 'src/trial', 'src/model'],
  'src/run': ['src/pipeline', 'src/output', 'src/report', 'src/trial', 'src/model'],
  'src/dashboard/view': ['src/output', 'src/trial', 'src/model'],
  'src/dashboard/hooks': ['src/dashboard/view', 'src/trial'],
  'src/dashboard/components': ['src/dashboard/hooks', 'src/dashboard/view', 'src/output', 'src/trial', 'src/model'],
  'src/dashboard/thread': ['src/dashboard/components', 'src/dashboard/view', 'src/trial', 'src/model'],
  'src/study': ['src/run', 'src/output', 'src/report', 'adapters', 'src/trial', 'src/model'],
  'src/commands': [
    'src/study',
    'src/dashboard/thread',
    'src/run',
    'src/session-log',
    'src/sim',
    'src/report',
    'src/output',
    'src/pipeline',
    'adapters',
    'src/trial',
    'src/model',
  ],
  src: ['src/commands', 'src/run'],
  bin: ['src'],
};

function sourceFiles(folder: string): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(join(ROOT, folder), { withFileTypes: true })) {
    const path = join(folder, entry.name);
    if (entry.isDirectory()) out.push(...sourceFiles(path));
    else if (/\.(ts|tsx|js)$/.test(entry.name) && !entry.name.endsWith('.d.ts')) out.push(path);
  }
  return out;
}

function folderOf(file: string): string {
  let best = '';
  for (const folder of Object.keys(MAY_IMPORT)) {
    if (file.startsWith(`${folder}/`) && folder.length > best.length) best = folder;
  }
  return best;
}

const files = ['src', 'adapters', 'bin'].flatMap(sourceFiles);
const graph = new Map<string, string[]>();
for (const file of files) {
  const info = ts.preProcessFile(readFileSync(join(ROOT, file), 'utf8'), true, true);
  graph.set(
    file,
    info.importedFiles.filter((i) => i.fileName.startsWith('.')).map((i) => relative(ROOT, resolve(ROOT, dirname(file), i.fileName))),
  );
}

/** Strongly connected components of more than one file (Tarjan), or a file importing itself. */
function cycles(): string[][] {
  let next = 0;
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const found: string[][] = [];
  const visit = (v: string): void => {
    index.set(v, next);
    low.set(v, next);
    next++;
    stack.push(v);
    onStack.add(v);
    for (const w of graph.get(v) ?? []) {
      if (!graph.has(w)) continue;
      if (!index.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v) as number, low.get(w) as number));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v) as number, index.get(w) as number));
    }
    if (low.get(v) === index.get(v)) {
      const component: string[] = [];
      let w: string | undefined;
      do {
        w = stack.pop();
        if (w === undefined) break;
        onStack.delete(w);
        component.push(w);
      } while (w !== v);
      if (component.length > 1 || (graph.get(v) ?? []).includes(v)) found.push(component);
    }
  };
  for (const v of graph.keys()) if (!index.has(v)) visit(v);
  return found;
}

describe('the source tree', () => {
  it('reads every source file into the graph', () => {
    expect(files.length).toBeGreaterThan(100);
    for (const file of files) expect(folderOf(file), `${file} is in no folder of the table`).not.toBe('');
  });

  it('has no import cycles', () => {
    expect(cycles()).toEqual([]);
  });

  it('imports only along the data path: each folder from the folders below it', () => {
    const wrong: string[] = [];
    for (const [file, targets] of graph) {
      const own = folderOf(file);
      const allowed = MAY_IMPORT[own] ?? [];
      for (const target of targets) {
        const theirs = folderOf(target);
        if (theirs === own || allowed.includes(theirs)) continue;
        wrong.push(`${file} imports ${target} (${own} may import from ${allowed.join(', ') || 'nothing outside itself'})`);
      }
    }
    expect(wrong).toEqual([]);
  });
});
