import { captureIo } from './helpers/capture-io.ts';
import { BIN, runChild } from './helpers/command-child.ts';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '../src/cli.ts';

const ROOT = join(import.meta.dirname, '..');
const DEMO = join(ROOT, 'replays', 'demo-walk.ndjson');

/**
 * Module hooks for the child process only (the command itself registers none): each module the child
 * resolves is appended, as a URL, to the file named by LENGTHWISE_TEST_LOADED.
 */
const RECORD_HOOKS = `import { appendFileSync } from 'node:fs';
export async function resolve(specifier, context, next) {
  const result = await next(specifier, context);
  appendFileSync(process.env.LENGTHWISE_TEST_LOADED, result.url + '\\n');
  return result;
}`;
const RECORD = `import { register } from 'node:module'; register(${JSON.stringify(`data:text/javascript,${encodeURIComponent(RECORD_HOOKS)}`)});`;

let work = '';
beforeAll(async () => {
  work = await mkdtemp(join(tmpdir(), 'lengthwise-cli-'));
});
afterAll(async () => {
  await rm(work, { recursive: true, force: true });
});

/** Runs the built command in a fresh process; gives what it printed and the packages it loaded (by name). */
async function packagesLoaded(name: string, args: readonly string[]): Promise<{ stdout: string; packages: Set<string>; files: string[] }> {
  const log = join(work, `${name}.loaded`);
  const { code, stdout, stderr } = await runChild(process.execPath, ['--import', `data:text/javascript,${encodeURIComponent(RECORD)}`, BIN, ...args], {
    env: { ...process.env, LENGTHWISE_TEST_LOADED: log, NO_COLOR: '1' },
  });
  expect(code, stderr).toBe(0);
  const files = (await readFile(log, 'utf8')).split('\n').filter((url) => url.startsWith('file:'));
  const packages = new Set(files.flatMap((url) => /\/node_modules\/((?:@[^/]+\/)?[^/]+)\//.exec(url)?.[1] ?? []));
  return { stdout, packages, files };
}

/** Packages that cost a command's start dearly and only some commands need. */
const HEAVY = ['ink', 'react', 'vega', 'vega-lite', 'ws'];
/** What compiles TypeScript: none of it runs when the command starts. */
const COMPILERS = ['tsx', 'esbuild', 'typescript'];

describe('lengthwise (the command)', () => {
  it('lists its commands on --help and exits 0', async () => {
    const c = captureIo();
    expect(await main(['--help'], c.io)).toBe(0);
    const text = c.out.join('\n');
    for (const name of ['replay', 'live', 'simulate', 'calibrate', 'curve', 'summarize']) expect(text).toContain(name);
  });

  it('shows usage and exits 2 with no command', async () => {
    const c = captureIo();
    expect(await main([], c.io)).toBe(2);
    expect(c.out.join('\n')).toContain('usage: lengthwise');
  });

  it('names an unknown command and shows what is accepted', async () => {
    const c = captureIo();
    expect(await main(['replya'], c.io)).toBe(2);
    expect(c.err.join('\n')).toContain('unknown command "replya"');
    expect(c.err.join('\n')).toContain('replay');
  });

  it('names the nearest command for a slip of the keyboard', async () => {
    const c = captureIo();
    expect(await main(['sumarize'], c.io)).toBe(2);
    expect(c.err.join('\n')).toContain('unknown command "sumarize"; did you mean `summarize`?');
  });

  it('prints the version of package.json on --version and exits 0', async () => {
    const c = captureIo();
    expect(await main(['--version'], c.io)).toBe(0);
    const pkg = JSON.parse(await readFile(join(ROOT, 'package.json'), 'utf8')) as { version: string };
    expect(c.out).toEqual([`lengthwise ${pkg.version}`]);
  });

  it('prints a command\'s own help on `help COMMAND`, as `COMMAND --help` does', async () => {
    for (const name of ['replay', 'live', 'simulate', 'calibrate', 'curve', 'summarize']) {
      const viaHelp = captureIo();
      expect(await main(['help', name], viaHelp.io)).toBe(0);
      const viaFlag = captureIo();
      expect(await main([name, '--help'], viaFlag.io)).toBe(0);
      expect(viaHelp.out.join('\n')).toMatch(new RegExp(`^usage: lengthwise ${name}`));
      expect(viaHelp.out).toEqual(viaFlag.out);
    }
    const unknown = captureIo();
    expect(await main(['help', 'replya'], unknown.io)).toBe(2);
    expect(unknown.err.join('\n')).toContain('did you mean `replay`?');
  });

  it('does not take inherited object keys for commands', async () => {
    const c = captureIo();
    expect(await main(['toString'], c.io)).toBe(2);
  });
});

describe('lengthwise as installed (the build in dist/)', () => {
  it('prints its version from plain JavaScript', async () => {
    const { stdout, packages } = await packagesLoaded('version', ['--version']);
    expect(stdout).toMatch(/^lengthwise \d+\.\d+\.\d+\n$/);
    expect([...packages]).toEqual([]);
  });

  it('prints its help from plain JavaScript, loading one file of the build and no package', async () => {
    const { stdout, packages, files } = await packagesLoaded('help', ['--help']);
    expect(stdout).toContain('usage: lengthwise <command>');
    expect([...packages]).toEqual([]);
    expect(files.filter((url) => url.includes('/dist/')).map((url) => url.replace(/^.*\/dist\//, ''))).toEqual(['cli.js']);
    expect(files.some((url) => /\.tsx?$/.test(url))).toBe(false);
  });

  it.each([
    ['curve', ['curve', '--sl', '2.0,2.7']],
    ['calibrate', ['calibrate', DEMO, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7']],
    ['replay with status lines', ['replay', DEMO, '--speed', 'max', '--plain']],
  ])('runs %s without loading the screen, the plots or the sockets', async (name, args) => {
    const { packages, files } = await packagesLoaded(name.replaceAll(' ', '-'), args);
    for (const heavy of [...HEAVY, ...COMPILERS]) expect(packages.has(heavy), `${heavy} was loaded`).toBe(false);
    expect(files.some((url) => /\.tsx?$/.test(url))).toBe(false);
  });

  it('loads the plots for a report and the sockets for a live session only when they are asked for', async () => {
    const report = await packagesLoaded('report', ['replay', DEMO, '--speed', 'max', '--plain', '--report', join(work, 'report.html')]);
    expect(report.packages.has('vega')).toBe(true);
    expect(report.packages.has('ink')).toBe(false);
    const simulate = await packagesLoaded('simulate', ['simulate', '--listen', '0', '--duration', '0.2']);
    expect(simulate.packages.has('ws')).toBe(true);
    expect(simulate.packages.has('vega')).toBe(false);
  });
});
