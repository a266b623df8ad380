/** The tool's whole replay path, as `lengthwise replay FILE --speed max --summary …` runs it. */
import { fileSource } from '../adapters/file-source.ts';
import { paceReplay } from '../src/pipeline/pace-replay.ts';
import { runTrial } from '../src/run/run-trial.ts';
import { summaryJson, type SummaryJson } from '../src/output/summary-json.ts';
import type { CalibrationSpec } from '../src/model/calibration.ts';
import type { DeviceMapping } from '../adapters/device-mapping.ts';

export interface ToolRun {
  readonly summary: SummaryJson;
  /** Wall time from opening the file to the summary object, ms. */
  readonly ms: number;
}

/** Reads, parses, cleans, converts, evaluates, segments and summarizes one file. */
export async function runToolReplay(path: string, calibration?: CalibrationSpec, mapping?: DeviceMapping): Promise<ToolRun> {
  const t0 = performance.now();
  const run = runTrial(fileSource(path, { mapping: mapping ?? null }).pipe(paceReplay('max')), {
    source: path,
    ...(calibration !== undefined ? { calibration } : {}),
  });
  const state = await run.done;
  const summary = summaryJson(state);
  return { summary, ms: performance.now() - t0 };
}
