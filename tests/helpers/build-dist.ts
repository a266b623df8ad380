// Run once before the tests (vitest.config.ts): builds dist/ from the sources as they are now. Tests that
// start bin/lengthwise.js, and the worker threads that the sources start, run that build, so a test never
// runs a build older than the sources it checks. Only files that changed are written.
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';

export default function buildDist(): void {
  const root = join(import.meta.dirname, '..', '..');
  execFileSync(process.execPath, [join(root, 'build.js')], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
}
