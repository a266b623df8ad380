/**
 * One trial file → its summary JSON (the same object `--summary` writes), or the reason it could not be
 * summarized. Runs the whole pipeline unpaced; never throws for a bad file.
 */
import { open, stat } from 'node:fs/promises';
import { tap } from 'rxjs';
import { fileSource } from '../../adapters/file-source.ts';
import type { DeviceMapping } from '../../adapters/device-mapping.ts';
import type { CalibrationSpec } from '../model/calibration.ts';
import { REASON_TEXT, type RejectReason } from '../trial/reasons.ts';
import { runTrial } from '../run/run-trial.ts';
import { summaryJson, type SummaryJson } from '../output/summary-json.ts';

export type TrialOutcome =
  | {
      readonly ok: true;
      readonly path: string;
      readonly summary: SummaryJson;
      /** Samples accepted by the pipeline. */
      readonly samples: number;
      readonly bytes: number;
      /** The trial's report sections, when the study asked its workers to draw them (see trialSectionsHtml). */
      readonly reportSections?: string;
      /** The plotting libraries' warnings while drawing them. */
      readonly reportWarnings?: readonly string[];
    }
  | { readonly ok: false; readonly path: string; readonly message: string; readonly bytes: number };

/** How far a trial has got: an estimate of the bytes read (from line numbers) and the samples seen. */
export interface TrialProgress {
  readonly bytesRead: number;
  readonly samples: number;
}

export interface SummarizeTrialOptions {
  /** Wins over each trial's header calibration, as in `replay --calibration`. */
  readonly calibration?: CalibrationSpec;
  /** NDJSON trials in a device's own names and units, as in `replay --mapping`. */
  readonly mapping?: DeviceMapping;
  /** Called after each batch of input. */
  readonly onProgress?: (progress: TrialProgress) => void;
}

const PROBE_BYTES = 64 * 1024;

/** Average bytes per line from the file's start, so line numbers can stand in for bytes read. */
async function bytesPerLine(path: string, size: number): Promise<number> {
  if (size === 0) return 1;
  const handle = await open(path, 'r');
  try {
    const buffer = Buffer.alloc(Math.min(PROBE_BYTES, size));
    const { bytesRead } = await handle.read(buffer, 0, buffer.length, 0);
    let lines = 0;
    for (let i = 0; i < bytesRead; i++) if (buffer[i] === 0x0a) lines++;
    return lines === 0 ? size : bytesRead / lines;
  } finally {
    await handle.close();
  }
}

function errorMessage(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

function rejectionList(byReason: Record<string, number>): string {
  return Object.entries(byReason)
    .sort((a, b) => b[1] - a[1])
    .map(([reason, n]) => `${n} ${reason} (${REASON_TEXT[reason as RejectReason] ?? reason})`)
    .join('; ');
}

/** Runs one trial file through the pipeline and returns its summary, or what went wrong and how to fix it. */
export async function summarizeTrial(path: string, options: SummarizeTrialOptions = {}): Promise<TrialOutcome> {
  let size: number;
  try {
    const info = await stat(path);
    if (!info.isFile()) {
      return { ok: false, path, bytes: 0, message: `${path} is not a file (a folder?); give trial files (NDJSON, CSV or session logs)` };
    }
    size = info.size;
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
    const why = code === 'ENOENT' ? 'no such file' : code;
    return { ok: false, path, bytes: 0, message: `cannot read ${path} (${why}); check the path and that the file is readable` };
  }
  let perLine: number;
  try {
    perLine = await bytesPerLine(path, size);
  } catch (error) {
    return { ok: false, path, bytes: size, message: `cannot read ${path}: ${errorMessage(error)}` };
  }

  let samples = 0;
  let lastLine = 0;
  const onProgress = options.onProgress;
  const records$ = fileSource(path, { mapping: options.mapping ?? null }).pipe(
    tap((batch) => {
      for (const frame of batch) {
        if (frame.kind === 'sample') samples++;
        if ('line' in frame && frame.line > lastLine) lastLine = frame.line;
      }
      onProgress?.({ bytesRead: Math.min(size, lastLine * perLine), samples });
    }),
  );
  const trial = runTrial(records$, { source: path, ...(options.calibration !== undefined ? { calibration: options.calibration } : {}) });
  let summary: SummaryJson;
  try {
    summary = summaryJson(await trial.done);
  } catch (error) {
    return { ok: false, path, bytes: size, message: errorMessage(error) };
  }
  const f = summary.frames;
  if (f.accepted === 0) {
    const message =
      f.received === 0
        ? `${path} is empty: no records; give a lengthwise-stream trial (NDJSON or CSV)`
        : `${path} has no valid sample in ${f.received} lines` +
          (f.rejected > 0 ? ` (rejected: ${rejectionList(f.rejected_by_reason)})` : '') +
          '; check that it is a lengthwise-stream trial (NDJSON, its CSV variant, or a session log)';
    return { ok: false, path, bytes: size, message };
  }
  return { ok: true, path, summary, samples: f.accepted, bytes: size };
}
