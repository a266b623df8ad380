/**
 * A simulated device for the live benchmark, run as its own process so its work never delays the
 * receiver: connects to a lengthwise server, sends the header, then one JSON array of records per
 * message interval as the device clock passes them (from the repo's generator; an invented walk).
 * Before each send it notes process.hrtime (the system's monotonic clock, the same in every process
 * on this machine) against the message's last device time; at the end it prints them as JSON.
 *
 * Usage: node bin/run-ts.js bench/live-sender.ts URL RATE_HZ MUSCLES DURATION_S MESSAGE_MS
 */
import { WebSocket } from 'ws';
import { createFeed } from '../src/sim/feed.ts';
import { scenarioSpec } from '../src/sim/scenarios.ts';

const [url, rateText, musclesText, durationText, messageText] = process.argv.slice(2);
if (url === undefined) {
  console.error('live-sender: give URL RATE_HZ MUSCLES DURATION_S MESSAGE_MS');
  process.exit(2);
}
const rateHz = Number(rateText ?? 500);
const muscleCount = Number(musclesText ?? 4);
const durationS = Number(durationText ?? 10);
const messageMs = Number(messageText ?? 10);
const names = ['calf', 'thigh', 'shin', 'hamstring', 'glute', 'foot'].slice(0, muscleCount);
const feed = createFeed(
  scenarioSpec('walk', { seed: 7, rateHz, durationS: durationS + 1, muscles: names, header: { subject: 'SYN-LIVE', trial: 'bench-live', calibrate: 'all' } }),
);

const ws = new WebSocket(url);
/** [last device time of the message (s), send time (ns, monotonic)] */
const sends: [number, string][] = [];
let samples = 0;
ws.on('error', (error) => {
  console.error(`live-sender: ${error.message}`);
  process.exit(1);
});
ws.on('open', () => {
  if (feed.header !== null) ws.send(JSON.stringify(feed.header));
  const startNs = process.hrtime.bigint();
  let tick = 0;
  const step = (): void => {
    tick++;
    const elapsedS = Number(process.hrtime.bigint() - startNs) / 1e9;
    const batch = feed.pull(elapsedS);
    if (batch.length > 0) {
      const last = batch[batch.length - 1];
      const text = JSON.stringify(batch);
      for (const r of batch) if ('muscle' in r) samples++;
      const now = process.hrtime.bigint();
      ws.send(text);
      if (last !== undefined && 't' in last) sends.push([last.t, now.toString()]);
    }
    if (elapsedS >= durationS) {
      ws.close(1000, 'done');
      return;
    }
    // Aim at the tick's own time, so late timers do not add up to drift.
    const dueNs = startNs + BigInt(Math.round(tick * messageMs * 1e6));
    const waitMs = Number(dueNs - process.hrtime.bigint()) / 1e6;
    setTimeout(step, Math.max(0, waitMs));
  };
  step();
});
ws.on('close', () => {
  process.stdout.write(`${JSON.stringify({ samples, sends })}\n`);
});
