/**
 * One trial file (or trial description) → its summary JSON (the same object `--summary` writes), or the reason it could not be
 * summarized. Runs the whole pipeline unpaced; never throws for a bad file.
 */
import { open, stat } from 'node:fs/promises';
import { tap } from 'rxjs';
import { openTrial } from '../../adapters/trial-source.ts';
import type { DescribedFile } from '../../adapters/described-trial.ts';
import type { DeviceMapping } from '../../adapters/device-mapping.ts';
import type { CalibrationSpec } from '../model/calibration.ts';
import type { Side } from '../trial/records.ts';
import type { Settings } from '../trial/settings.ts';
import { RejectionTally } from '../trial/rejection-tally.ts';
import { noUsableSample } from '../run/no-usable-sample.ts';
import { runTrial } from '../run/run-trial.ts';
import { summaryJson, type SummaryJson } from '../output/summary-json.ts';
import type { InputFileJson } from '../output/run-provenance.ts';
import type { TrialState } from '../trial/state.ts';

export type TrialOutcome =
  | {
      readonly ok: true;
      readonly path: string;
      readonly summary: SummaryJson;
      /** Samples accepted by the pipeline. */
      readonly samples: number;
      readonly bytes: number;
      /** A trial description's files (the description first), for the provenance; null for a trial file. */
      readonly files: readonly DescribedFile[] | null;
      /** The trial's report sections, when the study asked its workers to draw them (see trialSectionsHtml). */
      readonly reportSections?: string;
      /** The plotting libraries' warnings while drawing them. */
      readonly reportWarnings?: readonly string[];
      /** The trial's input files (the trial, its events file) with their sizes and SHA-256, when the study asked. */
      readonly inputs?: readonly InputFileJson[];
    }
  | { readonly ok: false; readonly path: string; readonly message: string; readonly bytes: number };

/** How far a trial has got: an estimate of the bytes read (from line numbers) and the samples seen. */
export interface TrialProgress {
  readonly bytesRead: number;
  readonly samples: number;
}

/** What a trial is read with besides its file: a study's, for every trial, or a manifest row's own. */
export interface TrialInputs {
  /** Wins over each trial's header calibration, as in `replay --calibration`. */
  readonly calibration?: CalibrationSpec;
  /** Trials in a device's own names, units and table layout, as in `replay --mapping`. */
  readonly mapping?: DeviceMapping;
  /** Gait events from another system, as in `replay --events`. */
  readonly eventsPath?: string;
  /** Muscles' sides, as in `replay --side` (the mapping's sides included). */
  readonly sides?: Readonly<Record<string, Side>>;
}

export interface SummarizeTrialOptions extends TrialInputs {
  /** Every processing choice, as in `replay --settings`. @default DEFAULT_SETTINGS */
  readonly settings?: Settings;
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

  // A trial file, or a trial description (its files read and checked before the trial runs).
  const opened = await openTrial(path, { calibration: options.calibration, mapping: options.mapping ?? null, eventsPath: options.eventsPath, sides: options.sides });
  if (!opened.ok) return { ok: false, path, bytes: size, message: opened.message };
  const { calibration, sides, files, spanS } = opened.trial;

  let samples = 0;
  let lastLine = 0;
  let lastS = Number.NaN;
  const rejections = new RejectionTally();
  const onProgress = options.onProgress;
  // A description's progress goes by its recordings' joint time, over the description's own bytes.
  const bytesRead = (): number =>
    spanS === null ? Math.min(size, lastLine * perLine) : Number.isFinite(lastS) ? size * Math.min(1, Math.max(0, (lastS - spanS.firstS) / (spanS.lastS - spanS.firstS))) : 0;
  const records$ = opened.trial.records().pipe(
    tap((batch) => {
      for (const frame of batch) {
        if (frame.kind === 'sample') {
          samples++;
          if (frame.line > lastLine) lastLine = frame.line;
          lastS = frame.tS;
        } else if (frame.kind === 'rejection') rejections.add(frame);
      }
      onProgress?.({ bytesRead: bytesRead(), samples });
    }),
  );
  const trial = runTrial(records$, {
    source: path,
    sides,
    ...(options.settings !== undefined ? { settings: options.settings } : {}),
    ...(calibration !== undefined ? { calibration } : {}),
  });
  let state: TrialState;
  try {
    state = await trial.done;
  } catch (error) {
    return { ok: false, path, bytes: size, message: errorMessage(error) };
  }
  const nothing = noUsableSample(path, state, rejections);
  if (nothing !== null) return { ok: false, path, bytes: size, message: nothing };
  const summary = summaryJson(state);
  const f = summary.frames;
  return { ok: true, path, summary, samples: f.accepted, bytes: size, files };
}
