/**
 * Debian's headless Chromium for the report tests: a fresh, empty profile each time, no background
 * traffic, and every host name unresolvable, so a page that fetched anything would fail to show it.
 */
import { execFile } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdtemp } from 'node:fs/promises';
import { join } from 'node:path';
import { promisify } from 'node:util';

const run = promisify(execFile);

/** The browser, or null when none is installed (the tests then skip with CHROMIUM_SKIP_NOTE). */
export const CHROMIUM = ['/usr/bin/chromium', '/usr/bin/chromium-browser'].find((p) => existsSync(p)) ?? null;

export const CHROMIUM_SKIP_NOTE = 'no Chromium at /usr/bin/chromium: install it (apt-get install -y chromium) to open the report in a browser';

/** Runs headless Chromium with `args` (a profile folder is made in `dir`); resolves to what it printed. */
export async function headlessChromium(dir: string, args: readonly string[]): Promise<string> {
  if (CHROMIUM === null) throw new Error(CHROMIUM_SKIP_NOTE);
  const profile = await mkdtemp(join(dir, 'profile-'));
  const { stdout } = await run(
    CHROMIUM,
    [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      '--hide-scrollbars',
      `--user-data-dir=${profile}`,
      '--host-resolver-rules=MAP * ~NOTFOUND',
      ...args,
    ],
    { timeout: 60_000, maxBuffer: 64 * 1024 * 1024 },
  );
  return stdout;
}
