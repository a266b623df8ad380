/**
 * Where a table's header row is, which delimiter splits its cells and which decimal mark its numbers use,
 * found from the file's first lines for each of these the mapping leaves out. The header row is the first
 * line that names every column the reading needs; the decimal mark is the one the numbers below it use.
 * When the file leaves a choice open (two delimiters give the named columns, both marks appear), the
 * table is refused with the reason, and the mapping's "table" settles it.
 */
import { DECIMAL_MARKS, DELIMITERS, type DecimalMark, type Delimiter, type TableSettings } from './device-mapping.ts';
import { didYouMean } from './nearest-name.ts';
import { isTableNumber, rowCells } from './table-cells.ts';

/** Non-blank lines from the file's start looked at to find the layout. */
export const LAYOUT_LINES = 64;

export interface FirstLine {
  readonly text: string;
  /** 1-based line number in the file (blank lines counted). */
  readonly line: number;
}

export interface LayoutQuery {
  readonly table: TableSettings;
  /** Column names the header row must have, each with where the name comes from (for messages). */
  readonly identify: readonly { readonly name: string; readonly from: string }[];
  /** Columns that hold numbers: the decimal mark is found from their cells. */
  readonly numeric: readonly string[];
}

export type Found = 'mapping' | 'found' | 'default';

export interface TableLayout {
  readonly delimiter: Delimiter;
  readonly delimiterFrom: Found;
  readonly decimal: DecimalMark;
  readonly decimalFrom: Found;
  /** The header row's line number; lines above it are notes, skipped. */
  readonly headerLine: number;
  /** The header row's cells, white space around them dropped. */
  readonly header: readonly string[];
}

export type LayoutResult = { readonly ok: true; readonly layout: TableLayout } | { readonly ok: false; readonly line: number; readonly problem: string };

const DELIMITER_NAME: Readonly<Record<Delimiter, string>> = { ',': '","', ';': '";"', '\t': '"\\t" (tab)', '|': '"|"' };

export function delimiterName(d: Delimiter): string {
  return DELIMITER_NAME[d];
}

function cellsOf(text: string, d: Delimiter): string[] | null {
  const r = rowCells(text, d);
  return r.ok ? r.cells : null;
}

function shown(text: string): string {
  return JSON.stringify(text.length > 80 ? `${text.slice(0, 80)}…` : text);
}

/** The lines the header row may be on: the one skip_lines points to, or any of the first lines. */
function headerCandidates(lines: readonly FirstLine[], table: TableSettings): FirstLine[] | { line: number; problem: string } {
  if (table.skipLines === undefined) return [...lines];
  const want = table.skipLines + 1;
  const at = lines.find((l) => l.line === want);
  if (at !== undefined) return [at];
  return {
    line: want,
    problem: `table.skip_lines is ${table.skipLines}, so the header row should be line ${want}, but that line is blank or past the end of the file; count every line above the header row, blank ones too`,
  };
}

/** Finds the header row, delimiter and decimal mark for a reading that needs the columns `query.identify`. */
export function findTableLayout(lines: readonly FirstLine[], query: LayoutQuery): LayoutResult {
  const candidates = headerCandidates(lines, query.table);
  if (!Array.isArray(candidates)) return { ok: false, ...candidates };
  const delimiters: readonly Delimiter[] = query.table.delimiter !== undefined ? [query.table.delimiter] : DELIMITERS;
  const names = query.identify.map((c) => c.name);
  for (const candidate of candidates) {
    const matches = delimiters.filter((d) => {
      const cells = cellsOf(candidate.text, d);
      return cells !== null && names.every((n) => cells.includes(n));
    });
    if (matches.length > 1) {
      return {
        ok: false,
        line: candidate.line,
        problem:
          `line ${candidate.line} names the columns when split at ${matches.map(delimiterName).join(' and at ')}: ` +
          `say which delimiter the table uses in the mapping, e.g. "table": {"delimiter": ${JSON.stringify(matches[0])}}`,
      };
    }
    const delimiter = matches[0];
    if (delimiter === undefined) continue;
    const header = cellsOf(candidate.text, delimiter) ?? [];
    for (const n of names) {
      if (header.indexOf(n) !== header.lastIndexOf(n)) {
        return { ok: false, line: candidate.line, problem: `the header row (line ${candidate.line}) names column "${n}" twice; rename one, so that each column is named once` };
      }
    }
    const decimal = findDecimal(lines, candidate.line, delimiter, header, query);
    if (!decimal.ok) return decimal;
    return {
      ok: true,
      layout: {
        delimiter,
        delimiterFrom: query.table.delimiter !== undefined ? 'mapping' : 'found',
        decimal: decimal.decimal,
        decimalFrom: decimal.from,
        headerLine: candidate.line,
        header,
      },
    };
  }
  return { ok: false, ...missingColumns(candidates, delimiters, query) };
}

/** Why no line is the header row: the likeliest line, the named columns it lacks and the columns it has. */
function missingColumns(candidates: readonly FirstLine[], delimiters: readonly Delimiter[], query: LayoutQuery): { line: number; problem: string } {
  let best: { line: FirstLine; cells: string[]; count: number } | null = null;
  for (const candidate of candidates) {
    for (const d of delimiters) {
      const cells = cellsOf(candidate.text, d);
      if (cells === null || cells.length < 2) continue;
      const count = query.identify.filter((c) => cells.includes(c.name)).length;
      if (best === null || count > best.count || (count === best.count && count === 0 && cells.length > best.cells.length)) best = { line: candidate, cells, count };
    }
  }
  const wanted = query.identify.map((c) => `"${c.name}" (${c.from})`).join(', ');
  if (best === null || best.count === 0) {
    const first = candidates[0];
    const seen =
      best !== null
        ? `; line ${best.line.line}, the likeliest header row, has ${best.cells.map((c) => `"${c}"`).join(', ')}`
        : first !== undefined
          ? `; the first line reads ${shown(first.text)}`
          : '; the file has no lines';
    return {
      line: best?.line.line ?? first?.line ?? 1,
      problem:
        `no line among the first ${LAYOUT_LINES} names the columns ${wanted}${seen}. ` +
        'If the columns are your own, give a mapping that names them (lengthwise inspect FILE --suggest-mapping prints one to start from)',
    };
  }
  const { line, cells } = best;
  const lacking = query.identify
    .filter((c) => !cells.includes(c.name))
    .map((c) => `"${c.name}" (${c.from})${didYouMean(c.name, cells, (n) => `"${n}"`)}`);
  return {
    line: line.line,
    problem:
      `the header row (line ${line.line}) lacks column${lacking.length > 1 ? 's' : ''} ${lacking.join(', ')}; ` +
      `it has ${cells.map((c) => `"${c}"`).join(', ')}. Add the missing column or fix its name in the file or the mapping`,
  };
}

const COMMA_NUMBER = /^[+-]?\d*,\d+(?:[eE][+-]?\d+)?$/;
const POINT_NUMBER = /^[+-]?\d*\.\d+(?:[eE][+-]?\d+)?$/;

/** The decimal mark of the numbers below the header row, or the reason it cannot be told. */
function findDecimal(
  lines: readonly FirstLine[],
  headerLine: number,
  delimiter: Delimiter,
  header: readonly string[],
  query: LayoutQuery,
): { ok: true; decimal: DecimalMark; from: Found } | { ok: false; line: number; problem: string } {
  if (query.table.decimal !== undefined) return { ok: true, decimal: query.table.decimal, from: 'mapping' };
  // Cells split at commas hold their numbers with points; a table of quoted decimal commas must say so.
  if (delimiter === ',') return { ok: true, decimal: '.', from: 'default' };
  const columns = query.numeric.map((n) => header.indexOf(n)).filter((i) => i >= 0);
  let comma: number | null = null;
  let point: number | null = null;
  for (const l of lines) {
    if (l.line <= headerLine) continue;
    const cells = cellsOf(l.text, delimiter);
    if (cells === null) continue;
    for (const i of columns) {
      const cell = cells[i] ?? '';
      if (comma === null && COMMA_NUMBER.test(cell)) comma = l.line;
      if (point === null && POINT_NUMBER.test(cell)) point = l.line;
    }
  }
  if (comma !== null && point !== null) {
    return {
      ok: false,
      line: Math.max(comma, point),
      problem:
        `numbers below the header row use both decimal marks ("," on line ${comma}, "." on line ${point}): ` +
        'say which the table uses in the mapping, e.g. "table": {"decimal": ","}',
    };
  }
  if (comma !== null) return { ok: true, decimal: ',', from: 'found' };
  return { ok: true, decimal: '.', from: point !== null ? 'found' : 'default' };
}

/** A table whose columns nobody has named yet: its likeliest header row, delimiter and decimal mark. */
export interface GuessedTable extends TableLayout {
  /** The first data row's cells, for each column: a sample value. */
  readonly firstRow: readonly string[];
}

/**
 * Guesses a table's layout without knowing its column names (for a mapping skeleton): the header row is
 * the first line, with two or more cells and no number among them, after which the next lines have as
 * many cells with numbers among them. Earliest wins, then most columns; null when nothing looks like a table.
 */
export function guessTableLayout(lines: readonly FirstLine[], table: TableSettings = {}): GuessedTable | null {
  const delimiters: readonly Delimiter[] = table.delimiter !== undefined ? [table.delimiter] : DELIMITERS;
  const candidates = headerCandidates(lines, table);
  if (!Array.isArray(candidates)) return null;
  for (const candidate of candidates) {
    const index = lines.indexOf(candidate);
    let best: { delimiter: Delimiter; header: string[]; rows: string[][] } | null = null;
    for (const d of delimiters) {
      const header = cellsOf(candidate.text, d);
      if (header === null || header.length < 2 || header.some((c) => c === '' || DECIMAL_MARKS.some((m) => isTableNumber(c, m)))) continue;
      const rows = lines
        .slice(index + 1, index + 6)
        .map((l) => cellsOf(l.text, d))
        .filter((r): r is string[] => r !== null);
      if (rows.length === 0 || rows.some((r) => r.length !== header.length)) continue;
      if (!rows.every((r) => r.some((c) => DECIMAL_MARKS.some((m) => isTableNumber(c, m))))) continue;
      if (best === null || header.length > best.header.length) best = { delimiter: d, header, rows };
    }
    if (best === null) continue;
    const numeric = best.header.filter((_, i) => best.rows.some((r) => DECIMAL_MARKS.some((m) => isTableNumber(r[i] ?? '', m))));
    const decimal = findDecimal(lines, candidate.line, best.delimiter, best.header, { table, identify: [], numeric });
    return {
      delimiter: best.delimiter,
      delimiterFrom: table.delimiter !== undefined ? 'mapping' : 'found',
      decimal: decimal.ok ? decimal.decimal : '.',
      decimalFrom: decimal.ok ? decimal.from : 'default',
      headerLine: candidate.line,
      header: best.header,
      firstRow: best.rows[0] ?? [],
    };
  }
  return null;
}
