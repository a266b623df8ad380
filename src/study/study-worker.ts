/** A study worker thread: summarizes each trial it is sent, one at a time, and posts progress and outcomes. */
import { parentPort, workerData } from 'node:worker_threads';
import type { JobMessage, WorkerMessage, WorkerSetup } from './messages.ts';
import { summarizeTrial, type TrialOutcome } from './summarize-trial.ts';

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
  void summarizeTrial(job.path, {
    ...(setup.settings !== undefined ? { settings: setup.settings } : {}),
    ...(setup.calibration !== undefined ? { calibration: setup.calibration } : {}),
    ...(setup.mapping !== undefined ? { mapping: setup.mapping } : {}),
    ...(setup.eventsPath !== undefined ? { eventsPath: setup.eventsPath } : {}),
    ...(setup.sides !== undefined ? { sides: setup.sides } : {}),
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
    .then((outcome) => (setup.drawReport ? withReport(outcome, job.id + 1) : outcome))
    .then((outcome) => post({ type: 'done', id: job.id, outcome }));
});
