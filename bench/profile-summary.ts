/**
 * Summarizes a V8 .cpuprofile (from `node --cpu-prof`): self time per function, highest first.
 * Usage: node bin/run-ts.js bench/profile-summary.ts FILE.cpuprofile [TOP]
 */
import { readFileSync } from 'node:fs';

interface ProfileNode {
  readonly id: number;
  readonly callFrame: { readonly functionName: string; readonly url: string; readonly lineNumber: number; readonly columnNumber: number };
  readonly children?: readonly number[];
  readonly positionTicks?: readonly { readonly line: number; readonly ticks: number }[];
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

/** Ticks per source line inside the functions of one name (the profile's positionTicks), highest first. */
export function lineTicks(profile: Profile, functionName: string): { line: number; ticks: number }[] {
  const byLine = new Map<number, number>();
  for (const n of profile.nodes) {
    if (n.callFrame.functionName !== functionName) continue;
    for (const p of n.positionTicks ?? []) byLine.set(p.line, (byLine.get(p.line) ?? 0) + p.ticks);
  }
  return [...byLine.entries()].map(([line, ticks]) => ({ line, ticks })).sort((a, b) => b.ticks - a.ticks);
}

// Usage: profile-summary.ts FILE [TOP]  |  profile-summary.ts FILE --lines FUNCTION (hot lines of a function)
const file = process.argv[2];
if (file !== undefined && process.argv[1]?.endsWith('profile-summary.ts')) {
  const profile = JSON.parse(readFileSync(file, 'utf8')) as Profile;
  if (process.argv[3] === '--lines') {
    for (const r of lineTicks(profile, process.argv[4] ?? '').slice(0, 25)) console.log(`${String(r.ticks).padStart(7)} ticks  line ${r.line}`);
  } else {
    const top = Number(process.argv[3] ?? 30);
    for (const r of selfTimes(profile).slice(0, top)) console.log(`${r.ms.toFixed(0).padStart(7)} ms ${(r.share * 100).toFixed(1).padStart(5)}%  ${r.name}`);
  }
}
