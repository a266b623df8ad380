/**
 * Invented trial lines for the adapter tests: a made-up muscle "calf" shortening and lengthening around
 * 50 mm at 100 Hz, with a foot strike every second. No recorded data; numbers chosen for round values.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export function sampleLine(i: number): string {
  const tS = i / 100;
  const fascicleMm = 50 + 5 * Math.sin(2 * Math.PI * tS);
  return JSON.stringify({ t: tS, muscle: 'calf', fascicle_mm: Number(fascicleMm.toFixed(3)), pennation_deg: 20, quality: 0.9 });
}

export function ndjsonTrial(samples: number): string[] {
  const lines = [JSON.stringify({ format: 'lengthwise-stream', version: 1, trial: 'invented', muscles: { calf: { side: 'left' } } })];
  for (let i = 0; i < samples; i++) {
    if (i % 100 === 0) lines.push(JSON.stringify({ t: i / 100, event: 'foot_strike', side: 'left' }));
    lines.push(sampleLine(i));
  }
  return lines;
}

export function csvTrial(samples: number): string[] {
  const lines = ['time_s,muscle,fascicle_mm,pennation_deg,quality,event,side'];
  for (let i = 0; i < samples; i++) {
    const tS = i / 100;
    if (i % 100 === 0) lines.push(`${tS},,,,,foot_strike,left`);
    lines.push(`${tS},calf,${(50 + 5 * Math.sin(2 * Math.PI * tS)).toFixed(3)},20,0.9,,`);
  }
  return lines;
}

/** A fresh directory under the system's temporary directory; remove() deletes it. */
export function tempDir(): { readonly dir: string; readonly file: (name: string, content: string | Buffer) => string; readonly remove: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'lengthwise-adapters-'));
  return {
    dir,
    file: (name, content) => {
      const path = join(dir, name);
      writeFileSync(path, content);
      return path;
    },
    remove: () => rmSync(dir, { recursive: true, force: true }),
  };
}
