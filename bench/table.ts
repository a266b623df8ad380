/**
 * A lab's own table against our own CSV: the same bench trial written as our CSV and as a wide table with
 * decimal commas (";" between cells, a row per time, a column per muscle, read through a mapping), each
 * replayed by the tool in one process, alternating, after a warm-up of each. The figure is the median
 * ratio of the wide table's time to our CSV's (target: at most 1.3×).
 */
import { createWriteStream } from 'node:fs';
import { once } from 'node:events';
import { join } from 'node:path';
import { concatMap, lastValueFrom } from 'rxjs';
import { fileSource } from '../adapters/file-source.ts';
import { parseDeviceMapping, type DeviceMapping } from '../adapters/device-mapping.ts';
import { writeBenchTrial } from './generate.ts';
import { figureDifferences, figuresFromSummary } from './figures.ts';
import { runToolReplay } from './tool-replay.ts';
import { alternate, paired, timeHere, type Paired } from './paired.ts';

/** Each pair's wide table / our CSV, by wall and by process CPU time. */
export interface TableResult extends Paired<'wide', 'csv'> {
  readonly samples: number;
  readonly csvBytes: number;
  readonly wideBytes: number;
  /** Where the two replays' figures differ (the wide table leaves out the CSV's bad rows); empty when they agree. */
  readonly differences: readonly string[];
}

function comma(x: number): string {
  return String(x).replace('.', ',');
}

/** Writes our CSV trial's valid records as a wide table, streamed; returns its mapping and size. */
async function writeWide(csvPath: string, widePath: string, muscles: readonly string[]): Promise<{ mapping: DeviceMapping; bytes: number }> {
  const out = createWriteStream(widePath);
  let bytes = 0;
  const write = async (text: string): Promise<void> => {
    bytes += Buffer.byteLength(text);
    if (!out.write(text)) await once(out, 'drain');
  };
  const columns = muscles.flatMap((m) => [`${m} (mm)`, `${m} pennation (deg)`, `${m} quality`]);
  await write(`Invented bench station\nwide table, decimal commas\n\n${['Time (s)', ...columns, 'Event', 'Foot'].join(';')}\n`);
  let rowT = Number.NaN;
  const empty = (): string[] => columns.map(() => '');
  let cells: string[] = empty();
  const row = (): string => `${comma(rowT)};${cells.join(';')};;\n`;
  await lastValueFrom(
    fileSource(csvPath).pipe(
      concatMap(async (batch) => {
        let text = '';
        for (const f of batch) {
          if (f.kind === 'sample') {
            const i = 3 * muscles.indexOf(f.muscle);
            if (f.tS !== rowT || cells[i] !== '') {
              if (!Number.isNaN(rowT)) text += row();
              cells = empty();
              rowT = f.tS;
            }
            cells[i] = comma(f.fascicleMm);
            cells[i + 1] = Number.isNaN(f.pennationDeg) ? '' : comma(f.pennationDeg);
            cells[i + 2] = comma(f.quality);
          } else if (f.kind === 'event') {
            // The row so far goes first, so the event keeps its place among the samples.
            if (!Number.isNaN(rowT)) text += row();
            cells = empty();
            rowT = Number.NaN;
            text += `${comma(f.tS)};${empty().join(';')};${f.event};${f.side}\n`;
          }
        }
        await write(text);
      }),
    ),
    { defaultValue: undefined },
  );
  if (!Number.isNaN(rowT)) await write(row());
  out.end();
  await once(out, 'finish');
  const parsed = parseDeviceMapping({
    format: 'lengthwise-mapping',
    version: 1,
    fields: { t: 'Time (s)', event: 'Event', side: 'Foot' },
    muscles: Object.fromEntries(muscles.map((m) => [m, { fascicle: `${m} (mm)`, pennation: `${m} pennation (deg)`, quality: `${m} quality` }])),
  });
  if (!parsed.ok) throw new Error(parsed.problems.join('; '));
  return { mapping: parsed.mapping, bytes };
}

export async function measureTable(dir: string, samples: number, pairs: number): Promise<TableResult> {
  const trial = await writeBenchTrial(dir, 'csv', { samples });
  const muscles = trial.spec.muscles.map((m) => m.name);
  const widePath = join(dir, `bench-${samples}-wide.csv`);
  const { mapping, bytes } = await writeWide(trial.path, widePath, muscles);
  const warmCsv = await runToolReplay(trial.path, trial.calibration);
  const warmWide = await runToolReplay(widePath, trial.calibration, mapping);
  const differences = figureDifferences(figuresFromSummary(warmCsv.summary), figuresFromSummary(warmWide.summary));
  const runs = await alternate(
    pairs,
    () => timeHere(() => runToolReplay(trial.path, trial.calibration)),
    () => timeHere(() => runToolReplay(widePath, trial.calibration, mapping)),
  );
  return { samples: trial.samples, csvBytes: trial.bytes, wideBytes: bytes, ...paired('wide', runs.b, 'csv', runs.a), differences };
}
