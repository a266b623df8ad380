/**
 * Many trials at once: a pool of worker threads, each running the whole pipeline over one trial file at
 * a time. Outcomes come back in the order the files were given, whatever order they finish in; a file
 * that fails is an outcome with its reason, and the others go on.
 */
import { stat } from 'node:fs/promises';
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { Settings } from '../trial/settings.ts';
import type { JobMessage, TrialSetup, WorkerMessage, WorkerSetup } from './messages.ts';
import type { TrialInputs, TrialOutcome } from './summarize-trial.ts';

export interface StudyProgress {
  readonly trialsTotal: number;
  readonly trialsDone: number;
  readonly trialsFailed: number;
  /** Sum of the files' sizes (files that cannot be read count 0). */
  readonly bytesTotal: number;
  /** Bytes of finished files plus an estimate for the files being read. */
  readonly bytesDone: number;
  /** Samples read so far, finished and unfinished trials together. */
  readonly samples: number;
}

export type StudyEvent =
  | { readonly type: 'progress'; readonly progress: StudyProgress }
  | { readonly type: 'trial'; readonly index: number; readonly outcome: TrialOutcome; readonly progress: StudyProgress };

/** The study's inputs are every trial's, unless a trial's own (perTrial) say otherwise. */
export interface StudyOptions extends TrialInputs {
  /** Worker threads; never more than the files. @default os.availableParallelism() */
  readonly jobs?: number;
  /** Every processing choice (--settings). @default DEFAULT_SETTINGS */
  readonly settings?: Settings;
  readonly onEvent?: (event: StudyEvent) => void;
  /** Stops the workers; trials not finished come back as failures saying so. */
  readonly signal?: AbortSignal;
  /** @default 20000 */
  readonly progressEverySamples?: number;
  /** Have the workers draw each trial's report sections as well (outcome.reportSections). @default false */
  readonly drawReport?: boolean;
  /** Have the workers read each trial's files' sizes and SHA-256 (outcome.inputs). @default false */
  readonly describeInputs?: boolean;
  /** Each trial's own calibration, mapping, events file and sides (a manifest's rows), in the paths' order. */
  readonly perTrial?: readonly (TrialSetup | undefined)[];
}

/**
 * A trial's thread runs plain JavaScript from the build (build.js): the file beside this module's own in
 * dist/, or, when this module runs from the sources (the tests build dist/ before they start), the
 * built copy.
 */
const WORKER_FILE = import.meta.url.endsWith('.js')
  ? new URL('./study-worker.js', import.meta.url)
  : new URL('../../dist/study-worker.js', import.meta.url);

export function defaultJobs(): number {
  return Math.max(1, availableParallelism());
}

async function sizeOf(path: string): Promise<number> {
  try {
    const info = await stat(path);
    return info.isFile() ? info.size : 0;
  } catch {
    return 0;
  }
}

interface Slot {
  readonly worker: Worker;
  /** The job in flight, or -1 when idle. */
  job: number;
}

/** Summarizes every file on worker threads; resolves with one outcome per file, in the files' order. */
export async function runStudy(paths: readonly string[], options: StudyOptions = {}): Promise<TrialOutcome[]> {
  const total = paths.length;
  const outcomes: (TrialOutcome | undefined)[] = new Array<TrialOutcome | undefined>(total).fill(undefined);
  if (total === 0) return [];
  const sizes = await Promise.all(paths.map(sizeOf));
  const bytesTotal = sizes.reduce((a, b) => a + b, 0);
  const inFlightBytes = new Map<number, number>();
  const inFlightSamples = new Map<number, number>();
  let finishedBytes = 0;
  let finishedSamples = 0;
  let done = 0;
  let failed = 0;
  let next = 0;

  const progress = (): StudyProgress => {
    let bytes = finishedBytes;
    let samples = finishedSamples;
    for (const b of inFlightBytes.values()) bytes += b;
    for (const s of inFlightSamples.values()) samples += s;
    return { trialsTotal: total, trialsDone: done, trialsFailed: failed, bytesTotal, bytesDone: Math.min(bytes, bytesTotal), samples };
  };

  const setup: WorkerSetup = {
    ...(options.settings !== undefined ? { settings: options.settings } : {}),
    ...(options.calibration !== undefined ? { calibration: options.calibration } : {}),
    ...(options.mapping !== undefined ? { mapping: options.mapping } : {}),
    ...(options.eventsPath !== undefined ? { eventsPath: options.eventsPath } : {}),
    ...(options.sides !== undefined ? { sides: options.sides } : {}),
    progressEverySamples: options.progressEverySamples ?? 20_000,
    drawReport: options.drawReport ?? false,
    describeInputs: options.describeInputs ?? false,
  };
  const requested = options.jobs ?? defaultJobs();
  const jobs = Math.max(1, Math.min(Number.isFinite(requested) ? Math.floor(requested) : 1, total));
  const slots = new Set<Slot>();

  return new Promise<TrialOutcome[]>((resolve) => {
    let settled = false;

    const finishAll = (): void => {
      if (settled) return;
      settled = true;
      options.signal?.removeEventListener('abort', onAbort);
      for (const slot of slots) void slot.worker.terminate();
      slots.clear();
      resolve(outcomes.map((o, i) => o ?? { ok: false, path: paths[i] as string, bytes: 0, message: `${paths[i]} was not summarized: the study was stopped first` }));
    };

    const record = (index: number, outcome: TrialOutcome): void => {
      if (outcomes[index] !== undefined || settled) return;
      outcomes[index] = outcome;
      inFlightBytes.delete(index);
      inFlightSamples.delete(index);
      finishedBytes += sizes[index] ?? 0;
      if (outcome.ok) finishedSamples += outcome.samples;
      else failed++;
      done++;
      options.onEvent?.({ type: 'trial', index, outcome, progress: progress() });
      if (done === total) finishAll();
    };

    const assign = (slot: Slot): void => {
      if (settled) return;
      if (next >= total) {
        slot.job = -1;
        slots.delete(slot);
        void slot.worker.terminate();
        return;
      }
      const id = next++;
      slot.job = id;
      const trial = options.perTrial?.[id];
      const job: JobMessage = { type: 'job', id, path: paths[id] as string, ...(trial !== undefined ? { trial } : {}) };
      slot.worker.postMessage(job);
    };

    const start = (): void => {
      const worker = new Worker(WORKER_FILE, { workerData: setup });
      const slot: Slot = { worker, job: -1 };
      slots.add(slot);
      worker.on('message', (message: WorkerMessage) => {
        if (message.type === 'progress') {
          inFlightBytes.set(message.id, message.bytesRead);
          inFlightSamples.set(message.id, message.samples);
          options.onEvent?.({ type: 'progress', progress: progress() });
          return;
        }
        record(message.id, message.outcome);
        assign(slot);
      });
      // A worker that dies takes only its own trial with it; a fresh worker takes the rest of the queue.
      const lost = (why: string): void => {
        if (!slots.has(slot) || settled) return;
        slots.delete(slot);
        const job = slot.job;
        if (job >= 0) {
          record(job, { ok: false, path: paths[job] as string, bytes: 0, message: `${paths[job]} could not be summarized: its worker thread stopped (${why})` });
        }
        if (!settled && next < total) start();
      };
      worker.on('error', (error) => lost(error.message));
      worker.on('exit', (code) => lost(`exit code ${code}`));
      assign(slot);
    };

    const onAbort = (): void => finishAll();
    if (options.signal?.aborted === true) {
      finishAll();
      return;
    }
    options.signal?.addEventListener('abort', onAbort, { once: true });
    for (let i = 0; i < jobs; i++) start();
  });
}
