/**
 * Whether two frames draw the same screen, so that a frame which would change nothing is not drawn
 * (an ended trial, a stream that has stopped with no alert counting the seconds: the screen then costs
 * nothing between changes). Everything the screen shows comes from the view, the status and the alerts found in them; the wall
 * clock (the frame's time, how long each muscle has been silent) counts only through the alerts it
 * raises and their texts.
 */
import type { RunStatus } from '../../trial/run-status.ts';
import { sameAlerts } from './alerts.ts';
import { detectAlerts, type TrialView } from './view-model.ts';

/** A frame as trial-frames.ts makes it. */
interface Frame {
  readonly view: TrialView;
  readonly status: RunStatus;
}

/** The view as text without its wall-clock fields. */
function shownJson(view: TrialView): string {
  return JSON.stringify(view, (key, value: unknown) => (key === 'wallMs' || key === 'lastSampleAgeMs' ? undefined : value));
}

export function sameScreen(a: Frame, b: Frame): boolean {
  if (a === b) return true;
  const [x, y] = [a.view, b.view];
  // While samples flow these differ at every frame: the answer comes without reading the rest.
  if (x.received !== y.received || !Object.is(x.lastTS, y.lastTS) || !Object.is(x.samplesPerS, y.samplesPerS)) return false;
  if (a.status !== b.status && JSON.stringify(a.status) !== JSON.stringify(b.status)) return false;
  if (shownJson(x) !== shownJson(y)) return false;
  // Whether the calibrate key is offered changes an alert's wording, the same way in both frames.
  return sameAlerts(detectAlerts(x, a.status, false), detectAlerts(y, b.status, false));
}
