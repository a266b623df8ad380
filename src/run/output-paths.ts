/**
 * Before a command does any work: an output path that names one of its inputs, the session log, or
 * another output of the same run is refused, with a message that says which and how to fix it. Two
 * paths are the same file when they name one file (by its device and inode, so links and other spellings
 * count) or, for a file not there yet, when they resolve to the same place (following links on the way).
 */
import { lstat, readlink, realpath, stat } from 'node:fs/promises';
import { basename, dirname, join, resolve } from 'node:path';

/** A path a command was given, and how a message names it ("--summary", "the trial file"). */
export interface NamedPath {
  readonly path: string;
  readonly role: string;
}

/** Links followed at most, as the system itself allows (ELOOP beyond). */
const MAX_LINKS = 40;

/** Where a path that may not exist yet resolves to: the real path of what exists of it, then the rest. */
async function resolvedPath(path: string, links = 0): Promise<string> {
  try {
    return await realpath(path);
  } catch {
    // Not there (yet), or not reachable: resolved piece by piece below.
  }
  if (links < MAX_LINKS) {
    try {
      if ((await lstat(path)).isSymbolicLink()) return await resolvedPath(resolve(dirname(path), await readlink(path)), links + 1);
    } catch {
      // Nothing at this path: its folder decides.
    }
  }
  const parent = dirname(path);
  return parent === path ? path : join(await resolvedPath(parent, links + 1), basename(path));
}

/** One key per file: device and inode for a file that exists, else where the path resolves to. */
async function fileKey(path: string): Promise<string> {
  const absolute = resolve(path);
  try {
    const info = await stat(absolute);
    return `file ${info.dev}:${info.ino}`;
  } catch {
    return `path ${await resolvedPath(absolute)}`;
  }
}

/**
 * The first clash among the outputs, or between an output and an input, as a message; null when every
 * output has a file of its own that is none of the inputs.
 */
export async function pathClash(inputs: readonly NamedPath[], outputs: readonly NamedPath[]): Promise<string | null> {
  const inputKeys = await Promise.all(inputs.map((p) => fileKey(p.path)));
  const outputKeys = await Promise.all(outputs.map((p) => fileKey(p.path)));
  for (let o = 0; o < outputs.length; o++) {
    const out = outputs[o] as NamedPath;
    const i = inputKeys.indexOf(outputKeys[o] as string);
    if (i >= 0) {
      const input = inputs[i] as NamedPath;
      return `${out.role} ${out.path} is ${input.role} (${input.path}): writing it would replace what this run reads or keeps; give ${out.role} another path`;
    }
    const before = outputKeys.indexOf(outputKeys[o] as string);
    if (before < o) {
      const other = outputs[before] as NamedPath;
      return `${out.role} ${out.path} is the same file as ${other.role} (${other.path}): each output needs a file of its own; give one of them another path`;
    }
  }
  return null;
}
