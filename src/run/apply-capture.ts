/** The dashboard's `c`, for every command that runs a trial: capture, apply and save a reference calibration. */
import type { TrialRun } from './run-trial.ts';
import { captureCalibration } from './capture-calibration.ts';
import { writeFileAtomic } from '../output/write-file.ts';
import { toolVersion } from './tool-version.ts';

/**
 * Takes the muscle's last 3 s of raw fascicle lengths at an assumed sarcomere length, applies the result
 * to the running trial from now on, and saves it as a calibration file in `folder`. Returns the line to
 * show the person at the screen (what was done, or why not).
 */
export async function applyCapture(trial: TrialRun, muscle: string, sarcomereUm: number, folder = 'sessions'): Promise<string> {
  const species = trial.latest().muscles.get(muscle)?.species ?? 'human';
  const provenance = { created_utc: new Date().toISOString(), tool_version: toolVersion() };
  const result = captureCalibration(muscle, species, trial.recent.window(muscle, 3), sarcomereUm, provenance, trial.plausibleUm);
  if (!result.ok) return result.message;
  trial.inject([result.frame]);
  const stamp = new Date().toISOString().replaceAll(':', '-').replace(/\..*/, '');
  const written = await writeFileAtomic(`${folder}/calibration-${muscle.replace(/[^A-Za-z0-9_-]+/g, '_')}-${stamp}.json`, `${JSON.stringify(result.json, null, 2)}\n`);
  const spread = result.spreadPercent > 5 ? ` (posture not quiet: fascicle length varied ${result.spreadPercent.toFixed(0)}%)` : '';
  return written.ok
    ? `${muscle}: calibrated at ${sarcomereUm} µm from ${result.fascicleMm.toFixed(1)} mm${spread}; saved to ${written.path}`
    : `${muscle}: calibrated at ${sarcomereUm} µm${spread}, but not saved: ${written.message}`;
}
