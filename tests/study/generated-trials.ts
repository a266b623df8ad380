/**
 * Generated trials for the study and report tests, written into a fresh temporary folder by the repo's
 * own synthetic gait generator (invented scenarios, invented subject codes; no recorded data).
 */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createTrial, type GaitTrial } from '../../src/sim/gait-generator.ts';
import { scenarioSpec } from '../../src/sim/scenarios.ts';
import { writeCsv, writeNdjson } from '../../src/sim/writers.ts';
import { expect } from 'vitest';
import { REGION_KEYS } from '../../src/model/regions.ts';
import type { TrialFiguresJson } from '../../src/output/summary-json.ts';

export interface GeneratedTrial {
  readonly path: string;
  readonly trial: GaitTrial;
}

export interface TrialFolder {
  readonly dir: string;
  /** A walking or running trial of a few seconds, as NDJSON or CSV, with its own seed. */
  trial(name: string, options: { scenario?: 'walk' | 'run'; seed: number; durationS?: number; format?: 'ndjson' | 'csv'; subject?: string }): Promise<GeneratedTrial>;
  /** A file with the given content (for corrupt and odd files). */
  file(name: string, content: string | Buffer): Promise<string>;
  remove(): Promise<void>;
}

export async function trialFolder(prefix = 'lengthwise-study-'): Promise<TrialFolder> {
  const dir = await mkdtemp(join(tmpdir(), prefix));
  return {
    dir,
    async trial(name, options) {
      const scenario = options.scenario ?? 'walk';
      const trial = createTrial(
        scenarioSpec(scenario, {
          seed: options.seed,
          durationS: options.durationS ?? 8,
          header: { subject: options.subject ?? 'SYN-900', trial: name, calibrate: 'all' },
        }),
      );
      const path = join(dir, name);
      const result = options.format === 'csv' ? await writeCsv(trial.records({ badLines: 'csv' }), path) : await writeNdjson(trial.records(), path);
      if (!result.ok) throw new Error(result.problem);
      return { path, trial };
    },
    async file(name, content) {
      const path = join(dir, name);
      await writeFile(path, content);
      return path;
    },
    remove: () => rm(dir, { recursive: true, force: true }),
  };
}

/**
 * RFC 4180 CSV → rows of fields, written here independently of the writer under test: quoted fields may
 * hold commas, doubled quotes and line breaks; records end in CRLF or LF.
 */
export function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i] as string;
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        field += '"';
        i++;
      } else if (c === '"') quoted = false;
      else field += c;
      continue;
    }
    if (c === '"') quoted = true;
    else if (c === ',') {
      row.push(field);
      field = '';
    } else if (c === '\n' || c === '\r') {
      if (c === '\r' && text[i + 1] === '\n') i++;
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
    } else field += c;
  }
  if (field !== '' || row.length > 0) {
    row.push(field);
    rows.push(row);
  }
  return rows;
}

/** Rows of a CSV with a header row, as objects keyed by column name. */
export function csvRecords(text: string): Record<string, string>[] {
  const [head, ...rows] = parseCsv(text);
  if (head === undefined) return [];
  return rows.map((r) => Object.fromEntries(head.map((name, i) => [name, r[i] ?? ''])));
}

/** A number column of the study table read back: empty means unknown. */
export function csvNumber(text: string | undefined): number | null {
  return text === undefined || text === '' ? null : Number(text);
}

/** A study table row carries exactly the trial figures of its muscle's summary JSON. */
export function expectTrialFiguresIn(row: Record<string, string>, trial: TrialFiguresJson): void {
  for (const key of ['stride_count', 'sl_min_um', 'sl_max_um', 'sl_mean_um', 'sl_p5_um', 'sl_p95_um', 'force_mean'] as const) {
    expect(csvNumber(row[key]), key).toBe(trial[key]);
  }
  for (const key of REGION_KEYS) expect(csvNumber(row[`${key}_fraction`])).toBe(trial.region_fraction[key]);
}
