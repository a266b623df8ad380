/** What every command does when a trial ends: write the asked-for files and say what happened. */
import type { CommandIo } from './io.ts';
import type { TrialState } from '../trial/state.ts';
import { summaryJson, trialFigures } from '../output/summary-json.ts';
import { stridesCsv } from '../output/strides-csv.ts';
import { writeFileAtomic } from '../output/write-file.ts';
import { REGION_KEYS, REGION_LABEL } from '../model/regions.ts';
import { trialProvenance, writeSidecar, type ProvenanceSources } from './run-provenance.ts';

export interface FinishOptions {
  readonly summary?: string | undefined;
  readonly strides?: string | undefined;
  /** A self-contained HTML report with plots of the trial. */
  readonly report?: string | undefined;
  /** Where the summary goes when its own path cannot be written (a live session cannot be run again); the status is 1 all the same. */
  readonly summaryFallback?: string | undefined;
  /** What the outputs' provenance is made from: the settings and every file the run read. */
  readonly provenance?: ProvenanceSources;
}

/**
 * Writes the summary, stride table (with its provenance beside it) and report if asked; exit status 1
 * when a file could not be written.
 */
export async function finishTrial(state: TrialState, options: FinishOptions, io: CommandIo): Promise<number> {
  let status = 0;
  if (options.summary === undefined && options.strides === undefined && options.report === undefined) return status;
  const bare = summaryJson(state);
  const provenance = options.provenance !== undefined ? await trialProvenance(bare, options.provenance) : undefined;
  const summary = provenance !== undefined ? { ...bare, provenance } : bare;
  if (options.summary !== undefined) {
    const text = `${JSON.stringify(summary, null, 2)}\n`;
    let result = await writeFileAtomic(options.summary, text);
    if (!result.ok && options.summaryFallback !== undefined) {
      io.err(`lengthwise: ${result.message}`);
      status = 1;
      result = await writeFileAtomic(options.summaryFallback, text);
      if (result.ok) io.err(`summary written to ${result.path} instead`);
    } else if (result.ok) io.err(`summary written to ${result.path}`);
    if (!result.ok) {
      io.err(`lengthwise: ${result.message}`);
      status = 1;
    }
  }
  if (options.strides !== undefined) {
    const result = await writeFileAtomic(options.strides, stridesCsv(state));
    if (result.ok) io.err(`strides written to ${result.path}`);
    else {
      io.err(`lengthwise: ${result.message}`);
      status = 1;
    }
    const sidecar = result.ok && provenance !== undefined ? await writeSidecar(options.strides, provenance) : null;
    if (sidecar !== null && !sidecar.ok) {
      io.err(`lengthwise: ${sidecar.message}`);
      status = 1;
    }
  }
  if (options.report !== undefined) {
    // Loaded only when asked for: the plotting libraries take a moment to load.
    const { writeReport } = await import('../report/write-report.ts');
    const result = await writeReport(options.report, [summary], { title: `lengthwise report: ${state.trial ?? state.source}` });
    if (result.ok) io.err(`report written to ${result.path}`);
    else {
      io.err(`lengthwise: ${result.message}`);
      status = 1;
    }
  }
  return status;
}

function um(x: number | null): string {
  return x === null ? '—' : x.toFixed(2);
}

/** A short end-of-trial report for a person, when there is no dashboard. */
export function plainReport(state: TrialState): string {
  const f = state.frames;
  const lines = [
    `${state.source}: ${f.received} lines, ${f.accepted} samples accepted (${f.lowQuality} low quality), ${f.rejected} rejected` +
      (f.rejected > 0
        ? ` (${Object.entries(f.rejectedByReason)
            .map(([reason, n]) => `${reason} ${n}`)
            .join(', ')})`
        : ''),
  ];
  if (!state.calibrated) {
    const all = [...state.muscles];
    const uncalibrated = all.filter(([, m]) => m.calibrationSource === null || m.calibrationSource === 'baseline').map(([name]) => name);
    const which = uncalibrated.length > 0 && uncalibrated.length < all.length ? ` (${uncalibrated.join(', ')})` : '';
    lines.push(`UNCALIBRATED${which}: sarcomere lengths assume each muscle starts at its plateau middle; give --calibration for real estimates`);
  }
  for (const w of state.warnings) lines.push(`note: ${w}`);
  for (const [name, m] of state.muscles) {
    const t = trialFigures(m.strides);
    const main = REGION_KEYS.reduce((a, b) => (t.region_fraction[b] > t.region_fraction[a] ? b : a));
    lines.push(
      `${name} (${m.side ?? 'side unknown'}): ${t.stride_count} strides, SL ${um(t.sl_min_um)}–${um(t.sl_max_um)} µm (mean ${um(t.sl_mean_um)}), ` +
        `mostly ${REGION_LABEL[main]} (${(t.region_fraction[main] * 100).toFixed(0)}%)`,
    );
  }
  return lines.join('\n');
}
