/** The tool's own version, for the provenance a calibration carries: the `version` of the nearest lengthwise package.json above this file. */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

let cached: string | undefined;

/** "lengthwise X.Y.Z", or "lengthwise (version unknown)" when no package.json of ours is found. */
export function toolVersion(): string {
  if (cached !== undefined) return cached;
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 6; i++) {
    try {
      const pkg = JSON.parse(readFileSync(join(dir, 'package.json'), 'utf8')) as { name?: unknown; version?: unknown };
      if (pkg.name === 'lengthwise' && typeof pkg.version === 'string') return (cached = `lengthwise ${pkg.version}`);
    } catch {
      // No readable package.json here: look one folder up.
    }
    dir = dirname(dir);
  }
  return (cached = 'lengthwise (version unknown)');
}
