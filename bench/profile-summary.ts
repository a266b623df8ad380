/**
 * Summarizes a V8 .cpuprofile (from `node --cpu-prof`): self time per function, highest first.
 * Usage: node bin/run-ts.js bench/profile-summary.ts FILE.cpuprofile [TOP]
 */
import { readFileSync } from 'node:fs';

interface ProfileNode {
  readonly id: number;
  readonly callFrame: { readonly functionName: string; readonly url: string; readonly lineNumber: number; readonly columnNumber: number };
  readonly children?: readonly number[];
}
interface Profile {
  readonly nodes: readonly ProfileNode[];
  readonly samples: readonly number[];
  readonly timeDeltas: readonly number[];
}

export function selfTimes(profile: Profile): { name: string; ms: number; share: number }[] {
  const byId = new Map<number, ProfileNode>();
  for (const n of profile.nodes) byId.set(n.id, n);
  const self = new Map<string, number>();
  let total = 0;
  for (let i = 0; i < profile.samples.length; i++) {
    const node = byId.get(profile.samples[i] as number);
    const dt = (profile.timeDeltas[i] ?? 0) / 1000;
    if (node === undefined) continue;
    const f = node.callFrame;
    const where = f.url.replace(/^.*\/work\/main\//, '').replace(/^file:\/\//, '');
    const key = `${f.functionName || "(anonymous)"} ${where}:${f.lineNumber + 1}:${f.columnNumber + 1}`;
    self.set(key, (self.get(key) ?? 0) + dt);
    total += dt;
  }
  return [...self.entries()]
    .map(([name, ms]) => ({ name, ms, share: ms / total }))
    .sort((a, b) => b.ms - a.ms);
}

const file = process.argv[2];
if (file !== undefined && process.argv[1]?.endsWith('profile-summary.ts')) {
  const top = Number(process.argv[3] ?? 30);
  const rows = selfTimes(JSON.parse(readFileSync(file, 'utf8')) as Profile);
  for (const r of rows.slice(0, top)) console.log(`${r.ms.toFixed(0).padStart(7)} ms ${(r.share * 100).toFixed(1).padStart(5)}%  ${r.name}`);
}
