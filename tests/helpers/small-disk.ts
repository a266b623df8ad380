/**
 * A full disk for tests: a small tmpfs mounted in a mount namespace of the tested process's own
 * (`unshare -rm`), so nothing outside it sees the mount and it goes when the process ends. Where the
 * machine does not allow that, tests that need it are skipped and say why.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

function probe(): string | null {
  const dir = mkdtempSync(join(tmpdir(), 'lengthwise-small-disk-'));
  try {
    const r = spawnSync('unshare', ['-rm', 'sh', '-c', 'mount -t tmpfs -o size=16k tmpfs "$0" && touch "$0/x"', dir], { encoding: 'utf8' });
    if (r.error !== undefined) return `unshare cannot run here (${r.error.message})`;
    return r.status === 0 ? null : `this machine does not let a process mount a tmpfs of its own (${(r.stderr || `exit ${r.status}`).trim()})`;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Why a small disk cannot be made here, or null when it can. */
export const NO_SMALL_DISK: string | null = probe();

/**
 * The program and arguments that run `program args…` with a tmpfs of `sizeKiB` KiB mounted at `dir`
 * (an existing empty folder). Without `after` the program takes the namespace's process over, so signals
 * sent to the child reach it; with `after` (a shell command, e.g. listing the folder, `$0` being the
 * folder) that runs inside the same namespace once the program has ended, and the shell exits with the
 * program's status.
 */
export function onSmallDisk(dir: string, sizeKiB: number, program: string, args: readonly string[], after?: string): [string, string[]] {
  const mount = `mount -t tmpfs -o size=${sizeKiB}k tmpfs "$0" || exit 97`;
  const script = after === undefined ? `${mount}; exec "$@"` : `${mount}; "$@"; status=$?; ${after}; exit $status`;
  return ['unshare', ['-rm', 'sh', '-c', script, dir, program, ...args]];
}
