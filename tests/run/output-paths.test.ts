import { link, mkdir, mkdtemp, symlink, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { pathClash } from '../../src/run/output-paths.ts';

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-paths-'));
  await writeFile(join(dir, 't.ndjson'), '{}\n');
  await mkdir(join(dir, 'out'));
});

const trial = (): { path: string; role: string } => ({ path: join(dir, 't.ndjson'), role: 'the trial file' });

describe('pathClash', () => {
  it('finds nothing when every output has a file of its own that is no input', async () => {
    expect(await pathClash([trial()], [{ path: join(dir, 'out', 's.json'), role: '--summary' }, { path: join(dir, 'out', 'x.csv'), role: '--strides' }])).toBeNull();
  });

  it('names an output that is an input, by any spelling of its path', async () => {
    for (const spelled of [join(dir, 't.ndjson'), join(dir, 'out', '..', 't.ndjson'), `${dir}//t.ndjson`]) {
      expect(await pathClash([trial()], [{ path: spelled, role: '--summary' }])).toMatch(/^--summary .* is the trial file \(.*t\.ndjson\): writing it would replace what this run reads or keeps; give --summary another path$/);
    }
  });

  it('follows links: a link to an input, or a hard link of it, is the input', async () => {
    await symlink(join(dir, 't.ndjson'), join(dir, 'soft.json'));
    await link(join(dir, 't.ndjson'), join(dir, 'hard.json'));
    expect(await pathClash([trial()], [{ path: join(dir, 'soft.json'), role: '--summary' }])).toMatch(/is the trial file/);
    expect(await pathClash([trial()], [{ path: join(dir, 'hard.json'), role: '--report' }])).toMatch(/^--report .* is the trial file/);
  });

  it('names two outputs that would be one file, also when it does not exist yet', async () => {
    const message = await pathClash([], [
      { path: join(dir, 'new', 'x.csv'), role: '--strides' },
      { path: join(dir, 'new', 'deeper', '..', 'x.csv'), role: '--report' },
    ]);
    expect(message).toMatch(/^--report .* is the same file as --strides \(.*x\.csv\): each output needs a file of its own; give one of them another path$/);
  });

  it('resolves a folder link and a dangling link on the way to a file not there yet', async () => {
    await symlink(join(dir, 'out'), join(dir, 'out-link'));
    await symlink(join(dir, 'out', 'later.json'), join(dir, 'dangling.json'));
    expect(await pathClash([], [{ path: join(dir, 'out', 'a.json'), role: '--summary' }, { path: join(dir, 'out-link', 'a.json'), role: '--report' }])).toMatch(/same file/);
    expect(await pathClash([], [{ path: join(dir, 'dangling.json'), role: '--summary' }, { path: join(dir, 'out', 'later.json'), role: '--report' }])).toMatch(/same file/);
  });
});
