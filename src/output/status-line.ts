/**
 * One plain line of status, for when standard output is not a terminal (no dashboard): the command
 * prints it every few seconds. No colour, no cursor movement.
 */
import { REGION_LABEL } from '../model/regions.ts';
import type { TrialState } from '../trial/state.ts';
import { elapsed, fixed } from './format.ts';
import type { RunStatus } from '../trial/run-status.ts';
import { calibrationKnown } from '../trial/calibration-known.ts';

export function connectionText(status: RunStatus): string | null {
  const c = status.connection;
  if (c === undefined) return null;
  switch (c.state) {
    case 'connecting':
      return c.retryInS === undefined ? 'connecting' : `NOT CONNECTED, trying again in ${Math.max(0, Math.ceil(c.retryInS))} s`;
    case 'connected':
      return 'connected';
    case 'listening':
      return 'listening, no device yet';
    case 'ended':
      return 'stream ended';
    case 'reconnecting':
      return c.retryInS === undefined ? 'DISCONNECTED, reconnecting' : `DISCONNECTED, reconnecting in ${Math.max(0, Math.ceil(c.retryInS))} s`;
  }
}

function topReason(state: TrialState): string {
  let best: [string, number] | null = null;
  for (const [reason, count] of Object.entries(state.frames.rejectedByReason)) {
    if (count !== undefined && count > 0 && (best === null || count > best[1])) best = [reason, count];
  }
  return best === null ? '' : ` (most ${best[0]})`;
}

export function statusLine(state: TrialState, status: RunStatus = {}): string {
  const parts: string[] = [status.sourceLabel ?? state.source];
  const connection = connectionText(status);
  if (connection !== null) parts.push(connection);
  if (status.replay !== undefined) {
    const speed = status.replay.speed === 'max' ? 'max' : `${status.replay.speed}×`;
    parts.push(`replay ${Math.round(Math.min(1, Math.max(0, status.replay.progress)) * 100)}% at ${speed}`);
  }
  parts.push(`t ${elapsed(state.lastTS - state.firstTS)}`);
  parts.push(`${state.frames.accepted} samples`);
  if (state.frames.rejected > 0) parts.push(`${state.frames.rejected} rejected${topReason(state)}`);
  if (state.frames.lowQuality > 0) parts.push(`${state.frames.lowQuality} low quality`);
  const calibrated = calibrationKnown(state);
  parts.push(calibrated === null ? 'calibration pending' : calibrated ? 'calibrated' : 'UNCALIBRATED');
  for (const m of state.muscles.values()) {
    const s = m.latest;
    const side = m.side === null ? '' : ` ${m.side}`;
    const region = s?.region == null ? '' : ` ${REGION_LABEL[s.region]}`;
    parts.push(`${m.name}${side} ${fixed(s?.sarcomereUm ?? Number.NaN, 2)} µm${region}`);
  }
  if (state.ended) parts.push('ended');
  if (status.logPath !== undefined) parts.push(`log ${status.logPath}`);
  return parts.join(' | ');
}
