/**
 * A study's manifest (`summarize --study study.csv`): an RFC 4180 table with a header row and one row per
 * trial. Required columns `subject`, `condition`, `file`; optional `trial`, `calibration`, `events`,
 * `mapping`, `side` (`NAME=left;NAME=right`), `exclude` (true/false) and `note`; every other column is a
 * covariate, carried into the outputs unchanged. Paths are relative to the manifest's folder.
 *
 * Every problem is found before any trial runs, each with its row (the header row is row 1, as a
 * spreadsheet numbers them) and column: a missing column or value, a file that is not there, a value
 * not accepted, a calibration or mapping file that is not accepted, the same subject, condition and
 * trial twice. The manifest is read whole, bounded by MAX_MANIFEST_BYTES.
 */
import { readFile, stat } from 'node:fs/promises';
import { dirname, isAbsolute, join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { readCalibrationFile } from './calibration-file.ts';
import { readDeviceMapping, type DeviceMapping } from './device-mapping.ts';
import { putNamedSides } from './named-sides.ts';
import { nearestName } from './nearest-name.ts';
import type { CalibrationSpec } from '../src/model/calibration.ts';
import type { Side } from '../src/trial/records.ts';

/** Largest manifest read, bytes: some hundred thousand rows. */
export const MAX_MANIFEST_BYTES = 16 * 1024 * 1024;

export const REQUIRED_COLUMNS = ['subject', 'condition', 'file'] as const;
export const OPTIONAL_COLUMNS = ['trial', 'calibration', 'events', 'mapping', 'side', 'exclude', 'note'] as const;
const KNOWN_COLUMNS: readonly string[] = [...REQUIRED_COLUMNS, ...OPTIONAL_COLUMNS];

/** Subjects the study's tables use for their own rows (the group mean and SD of cycles.csv). */
export const RESERVED_SUBJECTS = ['mean', 'sd'] as const;

export interface ManifestRow {
  /** The row's number in the file, the header row being row 1. */
  readonly row: number;
  readonly subject: string;
  readonly condition: string;
  /** The trial's name: the `trial` cell, or its place among the subject's trials in the condition (1, 2, …). */
  readonly trial: string;
  /** The trial file, joined to the manifest's folder. */
  readonly file: string;
  readonly calibrationPath: string | null;
  readonly eventsPath: string | null;
  readonly mappingPath: string | null;
  /** The sides the `side` cell gives. */
  readonly sides: Readonly<Record<string, Side>>;
  readonly exclude: boolean;
  readonly note: string;
  /** Every other column's cell, as written. */
  readonly covariates: Readonly<Record<string, string>>;
}

export interface StudyManifest {
  readonly path: string;
  /** The covariate columns, in the manifest's order. */
  readonly covariates: readonly string[];
  readonly rows: readonly ManifestRow[];
  /** Each calibration and mapping file the rows name, read and accepted, by path. */
  readonly calibrations: ReadonlyMap<string, CalibrationSpec>;
  readonly mappings: ReadonlyMap<string, DeviceMapping>;
}

export interface ManifestProblem {
  /** Null for the file as a whole. */
  readonly row: number | null;
  readonly column: string | null;
  readonly message: string;
}

export type ManifestResult = { readonly ok: true; readonly manifest: StudyManifest } | { readonly ok: false; readonly problems: readonly ManifestProblem[] };

export interface ManifestOptions {
  /**
   * Column names the study's outputs write themselves (muscle, source_file, …): a covariate of that name
   * would stand beside them twice, so it is refused.
   */
  readonly reservedColumns?: readonly string[];
}

/** A problem as a line: `row 4, column "file": …`. */
export function manifestProblemText(p: ManifestProblem): string {
  const where = [p.row !== null ? `row ${p.row}` : null, p.column !== null ? `column "${p.column}"` : null].filter((x) => x !== null).join(', ');
  return where === '' ? p.message : `${where}: ${p.message}`;
}

/** Reads the side cell: `NAME=left;NAME=right` (spaces around the pieces allowed). */
function parseSides(text: string): { readonly ok: true; readonly sides: Record<string, Side> } | { readonly ok: false; readonly message: string } {
  const sides: Record<string, Side> = Object.create(null);
  const pieces = text.split(';').map((piece) => piece.trim()).filter((part) => part !== '');
  const problem = putNamedSides(pieces, sides, { spaces: true });
  if (problem?.kind === 'not_a_side') {
    return { ok: false, message: `"${problem.piece}" is not a side: give NAME=left or NAME=right, several separated by ";" (e.g. lat_gastroc=left;vastus_lat=right)` };
  }
  if (problem?.kind === 'twice') return { ok: false, message: `names "${problem.name}" twice; give each muscle's side once` };
  return { ok: true, sides };
}

function parseExclude(text: string): boolean | null {
  const t = text.trim().toLowerCase();
  if (t === '' || t === 'false') return false;
  if (t === 'true') return true;
  return null;
}

async function isFile(path: string): Promise<'file' | 'not a file' | 'missing'> {
  try {
    return (await stat(path)).isFile() ? 'file' : 'not a file';
  } catch {
    return 'missing';
  }
}

function resolvedIn(dir: string, path: string): string {
  return isAbsolute(path) ? path : join(dir, path);
}

/** Reads and checks a study manifest; every problem at once, none thrown. */
export async function readStudyManifest(path: string, options: ManifestOptions = {}): Promise<ManifestResult> {
  const whole = (message: string): ManifestResult => ({ ok: false, problems: [{ row: null, column: null, message }] });
  let text: string;
  try {
    const info = await stat(path);
    if (!info.isFile()) return whole(`${path} is not a file; give the study's manifest, a CSV table with a row per trial`);
    if (info.size > MAX_MANIFEST_BYTES) return whole(`${path} is ${info.size} bytes, more than a manifest may be (${MAX_MANIFEST_BYTES}); give a row per trial, not the trials' data`);
    text = await readFile(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
    return whole(`cannot read the manifest ${path} (${code === 'ENOENT' ? 'no such file' : code}); check the path`);
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  let records: string[][];
  try {
    records = parse(text, { relax_column_count: true, skip_empty_lines: true }) as string[][];
  } catch (error) {
    return whole(`${path} is not a CSV table (RFC 4180): ${(error as Error).message}; quote cells that hold commas ("a, b") and double the quotes inside them`);
  }
  const [header, ...body] = records;
  if (header === undefined) return whole(`${path} is empty; give a header row (subject,condition,file,…) and a row per trial`);
  const columns = header.map((c) => c.trim());
  const problems: ManifestProblem[] = [];
  const reserved = new Set(options.reservedColumns ?? []);
  const seenColumns = new Set<string>();
  columns.forEach((name, i) => {
    if (name === '') problems.push({ row: 1, column: null, message: `column ${i + 1} has no name; give every column a name in the header row` });
    else if (seenColumns.has(name)) problems.push({ row: 1, column: name, message: 'is given twice in the header row; give each column once' });
    else if (!KNOWN_COLUMNS.includes(name) && reserved.has(name)) {
      problems.push({ row: 1, column: name, message: "is a column the study's tables write themselves; rename this covariate (e.g. with a prefix)" });
    }
    seenColumns.add(name);
  });
  for (const required of REQUIRED_COLUMNS) {
    if (columns.includes(required)) continue;
    const near = nearestName(required, columns.filter((c) => !KNOWN_COLUMNS.includes(c)));
    problems.push({
      row: 1,
      column: required,
      message: `is missing from the header row${near !== null ? `; did you mean "${near}"?` : ''} (required: ${REQUIRED_COLUMNS.join(', ')}; optional: ${OPTIONAL_COLUMNS.join(', ')})`,
    });
  }
  if (problems.length > 0) return { ok: false, problems };

  const at = (name: string): number => columns.indexOf(name);
  const covariates = columns.filter((c) => !KNOWN_COLUMNS.includes(c));
  const dir = dirname(path);
  const cellOf = (cells: readonly string[], name: string): string => {
    const i = at(name);
    return i < 0 ? '' : (cells[i] ?? '').trim();
  };

  interface Pending {
    row: number;
    subject: string;
    condition: string;
    trialCell: string;
    file: string;
    calibrationPath: string | null;
    eventsPath: string | null;
    mappingPath: string | null;
    sides: Record<string, Side>;
    exclude: boolean;
    note: string;
    covariates: Record<string, string>;
  }
  const pending: Pending[] = [];
  /** The first row and column that name each file to check, by its resolved path. */
  const named = new Map<string, { row: number; column: string; given: string }>();
  const fileChecks: Promise<void>[] = [];
  const checkFile = (row: number, column: string, given: string): string => {
    const resolved = resolvedIn(dir, given);
    if (!named.has(`${column}\u0000${resolved}`)) {
      named.set(`${column}\u0000${resolved}`, { row, column, given });
      fileChecks.push(
        isFile(resolved).then((kind) => {
          if (kind === 'file') return;
          problems.push({
            row,
            column,
            message:
              kind === 'missing'
                ? `${given}: no such file (looked for ${resolved}); paths are relative to the manifest's folder, ${dir}`
                : `${given} is not a file (a folder?); give a file`,
          });
        }),
      );
    }
    return resolved;
  };

  body.forEach((cells, index) => {
    const row = index + 2;
    if (cells.every((c) => c.trim() === '')) return;
    if (cells.length > columns.length) {
      problems.push({ row, column: null, message: `has ${cells.length} cells and the header row ${columns.length}; quote cells that hold commas` });
      return;
    }
    for (const required of REQUIRED_COLUMNS) {
      if (cellOf(cells, required) === '') problems.push({ row, column: required, message: `is empty; every trial needs its ${required}` });
    }
    const subject = cellOf(cells, 'subject');
    if ((RESERVED_SUBJECTS as readonly string[]).includes(subject.toLowerCase())) {
      problems.push({ row, column: 'subject', message: `"${subject}" is kept for the group rows of cycles.csv (${RESERVED_SUBJECTS.join(', ')}); give the subject another code` });
    }
    const fileCell = cellOf(cells, 'file');
    const file = fileCell === '' ? '' : checkFile(row, 'file', fileCell);
    const optionalFile = (column: 'calibration' | 'events' | 'mapping'): string | null => {
      const given = cellOf(cells, column);
      return given === '' ? null : checkFile(row, column, given);
    };
    const sides = parseSides(cellOf(cells, 'side'));
    if (!sides.ok) problems.push({ row, column: 'side', message: sides.message });
    const exclude = parseExclude(cellOf(cells, 'exclude'));
    if (exclude === null) problems.push({ row, column: 'exclude', message: `"${cellOf(cells, 'exclude')}" is not accepted; give true or false (or leave it empty: false)` });
    const covariateCells: Record<string, string> = Object.create(null);
    for (const c of covariates) covariateCells[c] = cells[at(c)] ?? '';
    pending.push({
      row,
      subject,
      condition: cellOf(cells, 'condition'),
      trialCell: cellOf(cells, 'trial'),
      file,
      calibrationPath: optionalFile('calibration'),
      eventsPath: optionalFile('events'),
      mappingPath: optionalFile('mapping'),
      sides: sides.ok ? sides.sides : {},
      exclude: exclude === true,
      note: cellOf(cells, 'note'),
      covariates: covariateCells,
    });
  });
  if (pending.length === 0 && problems.length === 0) problems.push({ row: null, column: null, message: `${path} has a header row but no trial; give a row per trial` });
  await Promise.all(fileChecks);

  // Each calibration and mapping file once, checked as --calibration and --mapping would check it.
  const calibrations = new Map<string, CalibrationSpec>();
  const mappings = new Map<string, DeviceMapping>();
  for (const [key, where] of named) {
    const resolved = key.slice(key.indexOf('\u0000') + 1);
    if (where.column !== 'calibration' && where.column !== 'mapping') continue;
    if ((await isFile(resolved)) !== 'file') continue;
    if (where.column === 'calibration') {
      const result = await readCalibrationFile(resolved);
      if (result.ok) calibrations.set(resolved, result.spec);
      else problems.push({ row: where.row, column: 'calibration', message: `${where.given} was not accepted: ${result.problems.join('; ')}` });
    } else {
      const result = await readDeviceMapping(resolved);
      if (result.ok) mappings.set(resolved, result.mapping);
      else problems.push({ row: where.row, column: 'mapping', message: `${where.given} was not accepted: ${result.problems.join('; ')}` });
    }
  }

  // Trials without a name are numbered within their subject and condition; then each name once, and each file once.
  const counts = new Map<string, number>();
  const firstRow = new Map<string, number>();
  const fileRow = new Map<string, number>();
  const rows: ManifestRow[] = pending.map((p) => {
    const sameFile = p.file !== '' ? fileRow.get(p.file) : undefined;
    if (sameFile !== undefined) {
      problems.push({ row: p.row, column: 'file', message: `the trial file is given in row ${sameFile} already; each row is a trial of its own file` });
    } else if (p.file !== '') fileRow.set(p.file, p.row);
    const group = `${p.subject}\u0000${p.condition}`;
    const place = (counts.get(group) ?? 0) + 1;
    counts.set(group, place);
    const trial = p.trialCell !== '' ? p.trialCell : String(place);
    const key = `${group}\u0000${trial}`;
    const before = firstRow.get(key);
    if (before !== undefined) {
      problems.push({
        row: p.row,
        column: p.trialCell !== '' ? 'trial' : null,
        message: `subject "${p.subject}", condition "${p.condition}", trial "${trial}" is given in row ${before} already; give each trial a name of its own in the "trial" column`,
      });
    } else firstRow.set(key, p.row);
    const { trialCell: _trialCell, ...rest } = p;
    return { ...rest, trial };
  });
  if (problems.length > 0) {
    problems.sort((a, b) => (a.row ?? 0) - (b.row ?? 0) || KNOWN_COLUMNS.indexOf(a.column ?? '') - KNOWN_COLUMNS.indexOf(b.column ?? ''));
    return { ok: false, problems };
  }
  return { ok: true, manifest: { path, covariates, rows, calibrations, mappings } };
}
