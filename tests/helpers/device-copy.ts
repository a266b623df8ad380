/**
 * A trial file rewritten as the invented bench-probe-cm device (adapters/mappings/bench-probe-cm.json)
 * would record it: milliseconds from its own zero, centimetres, numbered channels. Only the valid-looking
 * records are kept, in both copies, so the two files hold the same trial.
 */
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { trialLines } from './trial-lines.ts';

export const DEVICE_MAPPING = join(import.meta.dirname, '..', '..', 'adapters', 'mappings', 'bench-probe-cm.json');

export async function deviceCopy(trial: string, dir: string): Promise<{ ours: string; device: string }> {
  const channel: Record<string, string> = { calf: 'ch1', thigh: 'ch2' };
  const ours: string[] = [];
  const device: string[] = [];
  for (const { text: line, record: r } of await trialLines(trial)) {
    if (r === null) continue;
    if (r['format'] === 'lengthwise-stream') {
      ours.push(line);
      device.push(line);
      continue;
    }
    if (typeof r['t'] !== 'number') continue;
    // time_s = time_ms / 1000 - 12.5 (the mapping's offset), so time_ms = (t + 12.5) × 1000.
    const timeMs = { time_ms: Math.round((r['t'] + 12.5) * 1e6) / 1e3 };
    if (typeof r['muscle'] === 'string' && typeof r['fascicle_mm'] === 'number' && channel[r['muscle']] !== undefined) {
      ours.push(line);
      device.push(
        JSON.stringify({
          ...timeMs,
          channel: channel[r['muscle']],
          fl_cm: r['fascicle_mm'] / 10,
          ...(r['pennation_deg'] === undefined ? {} : { pa: r['pennation_deg'] }),
          ...(r['quality'] === undefined ? {} : { q: r['quality'] }),
        }),
      );
    } else if (typeof r['event'] === 'string') {
      ours.push(line);
      device.push(JSON.stringify({ ...timeMs, event: r['event'], side: r['side'] }));
    }
  }
  const paths = { ours: join(dir, 'ours.ndjson'), device: join(dir, 'device.ndjson') };
  await writeFile(paths.ours, `${ours.join('\n')}\n`);
  await writeFile(paths.device, `${device.join('\n')}\n`);
  return paths;
}
