// Run once around the tests (vitest.config.ts): every temporary file and folder a test makes — in its own
// process, in the command it starts, in a worker — goes under one folder of this run, removed at the end,
// so a run leaves nothing behind in the machine's temporary folder. os.tmpdir() reads TMPDIR, which the
// test processes and their children inherit.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export default function testTmpdir(): () => void {
  const dir = mkdtempSync(join(tmpdir(), 'lengthwise-tests-'));
  process.env['TMPDIR'] = dir;
  return () => rmSync(dir, { recursive: true, force: true });
}
