/** A study worker thread: summarizes each trial it is sent, one at a time, and posts progress and outcomes. */
import { parentPort, workerData } from 'node:worker_threads';
import type { JobMessage, WorkerMessage, WorkerSetup } from './messages.ts';
import { summarizeTrial, type TrialOutcome } from './summarize-trial.ts';
import { describeInputs, type RunInput } from '../run/run-provenance.ts';

const port = parentPort;
if (port === null) throw new Error('study-worker.ts runs only as a worker thread; start it through runStudy');
const setup = workerData as WorkerSetup;

function post(message: WorkerMessage): void {
  port?.postMessage(message);
}

/** Adds the trial's report sections; a drawing failure leaves them out, and the main thread draws them instead. */
async function withReport(outcome: TrialOutcome, key: number): Promise<TrialOutcome> {
  if (!outcome.ok) return outcome;
  try {
    const { trialSectionsHtml } = await import('../report/report-html.ts');
    const warnings: string[] = [];
    const reportSections = await trialSectionsHtml(outcome.summary, key, warnings);
    return { ...outcome, reportSections, reportWarnings: warnings };
  } catch {
    return outcome;
  }
}

port.on('message', (job: JobMessage) => {
  let posted = 0;
  // A trial's own files win over the study's.
  const calibration = job.trial?.calibration ?? setup.calibration;
  const mapping = job.trial?.mapping ?? setup.mapping;
  const eventsPath = job.trial?.eventsPath ?? setup.eventsPath;
  const sides = job.trial?.sides ?? setup.sides;
  // The trial's files are read for their SHA-256 while the trial runs.
  const files: RunInput[] = [{ kind: 'trial', path: job.path }, ...(eventsPath !== undefined ? [{ kind: 'events' as const, path: eventsPath }] : [])];
  const described = setup.describeInputs === true ? describeInputs(files) : Promise.resolve(undefined);
  void summarizeTrial(job.path, {
    ...(setup.settings !== undefined ? { settings: setup.settings } : {}),
    ...(calibration !== undefined ? { calibration } : {}),
    ...(mapping !== undefined ? { mapping } : {}),
    ...(eventsPath !== undefined ? { eventsPath } : {}),
    ...(sides !== undefined ? { sides } : {}),
    onProgress: ({ bytesRead, samples }) => {
      if (samples - posted < setup.progressEverySamples) return;
      posted = samples;
      post({ type: 'progress', id: job.id, bytesRead, samples });
    },
  })
    .catch((error: unknown) => ({
      ok: false as const,
      path: job.path,
      bytes: 0,
      message: `${job.path} could not be summarized: ${error instanceof Error ? error.message : String(error)}`,
    }))
    .then(async (outcome) => {
      if (!outcome.ok || setup.describeInputs !== true) return outcome;
      // A trial description's own files (its recordings, mappings, events file, calibration) stand for its trial.
      const inputs = outcome.files !== null ? await describeInputs(outcome.files) : await described;
      return inputs !== undefined ? { ...outcome, inputs } : outcome;
    })
    .then((outcome) => (setup.drawReport ? withReport(outcome, job.id + 1) : outcome))
    .then((outcome) => post({ type: 'done', id: job.id, outcome }));
});
