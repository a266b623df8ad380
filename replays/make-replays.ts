/**
 * Writes the demo trials of replays/ from the generator (npm run make-replays). Deterministic: running it
 * twice gives identical bytes. `--out DIR` writes somewhere else (the tests use it).
 */
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { makeReplays } from '../src/sim/demo-trials.ts';

const { values } = parseArgs({ options: { out: { type: 'string' } }, strict: true });
const outDir = values.out ?? dirname(fileURLToPath(import.meta.url));
const results = await makeReplays(outDir);
let failed = false;
for (const r of results) {
  if (r.ok) console.log(`wrote ${r.path} (${r.lines} lines, ${r.bytes} bytes)`);
  else {
    failed = true;
    console.error(`make-replays: ${r.problem}`);
  }
}
process.exitCode = failed ? 1 : 0;
