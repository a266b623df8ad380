/** `lengthwise inspect FILE`: a dry run, saying how a file will be read, without running the pipeline. */
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import { mappingOption, SETTINGS_OPTION, settingsOption, sidesOption } from './option-files.ts';
import { inspectFile, type InspectedCounts, type InspectedRejection, type Inspection } from '../../adapters/inspect-file.ts';
import { delimiterName } from '../../adapters/table-layout.ts';
import type { Delimiter } from '../../adapters/device-mapping.ts';
import { inspectDescription, type DescriptionInspection } from '../../adapters/inspect-description.ts';
import { isTrialDescription } from '../../adapters/trial-description.ts';
import { mappedSides } from '../../adapters/device-mapping.ts';

const HELP = `usage: lengthwise inspect FILE [options]

Says how a trial file will be read, without running the pipeline: the layout, delimiter, decimal mark
and header row found; the column used for each field and the unit conversion applied; each muscle with
its side and where the side comes from; counts of rows, samples, events, markers and rejections by
reason, with the first bad lines; each muscle's time span, rate, gaps and fascicle-length range.
A trial description (lengthwise-trial JSON) is shown recording by recording, each with its muscles and
its span on the trial's clock, then the events file and the time the recordings overlap.

options:
  --mapping FILE         read the file through a mapping (lengthwise-mapping JSON), as replay would
  --settings FILE        processing settings (lengthwise-settings JSON): its gap_s says what a gap is
  --events FILE          an events file from another system, read as replay --events would
  --side NAME=left|right a muscle's side (repeatable), as for replay
  --json                 print the inspection as one JSON object (its keys are in the README)
  --suggest-mapping      print a mapping skeleton filled with the file's columns, to correct and save
  -h, --help             this text

Exit status: 0 the file can be read, 1 it cannot (or no skeleton could be made), 2 usage.`;

function round(x: number | null, digits = 3): string {
  return x === null ? '–' : String(Number(x.toFixed(digits)));
}

function countsLine(c: InspectedCounts): string {
  const reasons = Object.entries(c.rejected_by_reason)
    .sort((a, b) => b[1] - a[1])
    .map(([r, n]) => `${n} ${r}`)
    .join(', ');
  return `${c.lines} lines: ${c.samples} samples, ${c.events} gait events, ${c.markers} markers, ${c.headers} header rows, ${c.rejected} rejected${reasons === '' ? '' : ` (${reasons})`}`;
}

function rejectionLines(first: readonly InspectedRejection[]): string[] {
  return first.map((r) => `    line ${r.line}${r.field === null ? '' : ` (${r.field})`}: ${r.reason}: ${r.message}`);
}

/** The inspection in words, for a person. */
export function inspectionText(i: Inspection): string {
  const out: string[] = [`${i.file}: ${i.readable ? 'can be read' : 'cannot be read'}`];
  if (i.problem !== null) out.push(`  problem: ${i.problem}`);
  if (i.layout === 'ndjson') out.push('  layout: NDJSON, one record a line');
  if (i.table !== null) {
    out.push(`  layout: a table with a row per ${i.layout === 'wide' ? 'time and columns per muscle' : 'sample'}`);
    out.push(`  header row: line ${i.table.header_line}${i.table.header_line > 1 ? ` (the ${i.table.header_line - 1} lines above it are skipped)` : ''}`);
    out.push(`  delimiter: ${delimiterName(i.table.delimiter as Delimiter)} (${i.table.delimiter_from}); decimal mark: "${i.table.decimal}" (${i.table.decimal_from})`);
  }
  if (i.columns.length > 0) {
    out.push('  columns:');
    for (const c of i.columns) out.push(`    ${c.muscle === null ? c.field : `${c.muscle} ${c.field}`} ← "${c.column}" (${c.conversion})`);
  }
  out.push(`  ${countsLine(i.counts)}`);
  if (i.first_rejections.length > 0) out.push('  first rejected lines:', ...rejectionLines(i.first_rejections));
  for (const [name, m] of Object.entries(i.muscles)) {
    const side = m.side === null ? 'no side' : `${m.side} (${m.side_source === 'first_foot_strike' ? 'guessed from the first foot strike' : `from the ${m.side_source === 'option' ? '--side option' : m.side_source}`})`;
    const range = m.fascicle_mm === null ? '' : `, fascicle ${round(m.fascicle_mm.min, 2)}–${round(m.fascicle_mm.max, 2)} mm`;
    out.push(
      `  muscle ${name}: ${side}; ${m.samples} samples, ${round(m.first_s)}–${round(m.last_s)} s at ${round(m.rate_hz, 1)} Hz, ${m.gaps} gaps (longest ${round(m.longest_gap_s)} s)${range}`,
    );
    for (const w of m.warnings) out.push(`    warning: ${w}`);
  }
  const e = i.events_file;
  if (e !== null) {
    out.push(`  events file ${e.file}: ${e.readable ? 'can be read' : 'cannot be read'}; ${countsLine(e.counts)}; ${round(e.first_s)}–${round(e.last_s)} s on the samples' clock`);
    if (e.problem !== null) out.push(`    problem: ${e.problem}`);
    if (e.first_rejections.length > 0) out.push('    first rejected lines:', ...rejectionLines(e.first_rejections).map((l) => `  ${l}`));
  }
  if (i.suggested_mapping !== null) out.push('  the columns are not ours: lengthwise inspect FILE --suggest-mapping > mapping.json prints a mapping to start from');
  return out.join('\n');
}

function seconds(x: number): string {
  return String(Number(x.toFixed(3)));
}

/** A trial description's inspection in words: each recording as a file of its own, then the events file and the overlap. */
export function descriptionText(d: DescriptionInspection): string {
  const out: string[] = [`${d.file}: a trial description of ${d.recordings.length} recording${d.recordings.length === 1 ? '' : 's'}; ${d.readable ? 'can be read' : 'cannot be read'}`];
  const about = [d.subject === null ? null : `subject ${d.subject}`, d.trial === null ? null : `trial ${d.trial}`, d.calibration === null ? null : `calibration ${d.calibration}`].filter((x) => x !== null);
  if (about.length > 0) out.push(`  ${about.join('; ')}`);
  for (const note of d.notes) out.push(`  note: ${note}`);
  d.recordings.forEach((r, k) => {
    const [first, ...rest] = inspectionText({ ...r, suggested_mapping: null }).split('\n');
    const how = `${r.mapping === null ? 'no mapping' : `mapping ${r.mapping}`}, time offset ${r.time_offset_s} s`;
    out.push(`  recording ${k + 1}: ${(first ?? '').replace(/^(.*): /, `$1 (${how}): `)}`);
    out.push(...rest.map((line) => `  ${line}`));
    if (r.first_s !== null && r.last_s !== null) out.push(`    span on the trial's clock: ${seconds(r.first_s)}–${seconds(r.last_s)} s`);
  });
  out.push(
    d.overlap === null
      ? '  overlap of the recordings: none'
      : `  overlap of the recordings: ${seconds(d.overlap.first_s)}–${seconds(d.overlap.last_s)} s (${seconds(d.overlap.duration_s)} s)`,
  );
  const e = d.events_file;
  if (e !== null) {
    out.push(`  events file ${e.file}: ${e.readable ? 'can be read' : 'cannot be read'}; ${countsLine(e.counts)}; ${round(e.first_s)}–${round(e.last_s)} s on the trial's clock`);
    if (e.first_rejections.length > 0) out.push('    first rejected lines:', ...rejectionLines(e.first_rejections).map((l) => `  ${l}`));
  }
  if (d.problem !== null) out.push(...d.problem.split('\n').map((p) => `  problem: ${p}`));
  return out.join('\n');
}

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('inspect', HELP, argv, {
    mapping: { type: 'string' },
    ...SETTINGS_OPTION,
    events: { type: 'string' },
    side: { type: 'string', multiple: true },
    json: { type: 'boolean', default: false },
    'suggest-mapping': { type: 'boolean', default: false },
  }, io);
  if (typeof parsed === 'number') return parsed;
  const { values, positionals } = parsed;
  const [path, ...extra] = positionals;
  if (path === undefined || extra.length > 0) {
    io.err(`lengthwise inspect: give exactly one file (got ${positionals.length}).\n\n${HELP}`);
    return 2;
  }
  const settings = await settingsOption('inspect', values.settings, io);
  if (!settings.ok) return 2;
  const mapping = await mappingOption('inspect', values.mapping, io);
  if (!mapping.ok) return 2;
  const sides = sidesOption('inspect', undefined, values.side, io);
  if (sides === null) return 2;
  if (await isTrialDescription(path)) {
    if (values['suggest-mapping']) {
      io.err(`lengthwise inspect: ${path} is a trial description; run lengthwise inspect RECORDING --suggest-mapping on one of its recordings`);
      return 1;
    }
    const inspected = await inspectDescription(path, {
      mapping: mapping.value ?? null,
      eventsPath: values.events,
      sides: { ...mappedSides(mapping.value), ...sides },
      sideOption: sides,
      gapS: settings.value.gap_s,
    });
    if ('ok' in inspected) {
      io.err(`lengthwise inspect: ${inspected.message}`);
      return inspected.status;
    }
    io.out(values.json ? JSON.stringify(inspected, null, 2) : descriptionText(inspected));
    return inspected.readable ? 0 : 1;
  }
  const inspection = await inspectFile(path, { mapping: mapping.value ?? null, eventsPath: values.events, sides, gapS: settings.value.gap_s });
  if (values['suggest-mapping']) {
    if (inspection.suggested_mapping === null) {
      io.err(
        inspection.readable || values.mapping !== undefined
          ? `lengthwise inspect: ${path} is read ${values.mapping !== undefined ? 'through the mapping given' : 'in our own columns'}; no skeleton is needed`
          : `lengthwise inspect: no table was found in the first lines of ${path}, so no mapping could be suggested${inspection.problem === null ? '' : ` (${inspection.problem})`}`,
      );
      return 1;
    }
    io.out(JSON.stringify(inspection.suggested_mapping, null, 2));
    io.err('a skeleton from the column names: check each field, unit and muscle, and add each muscle\'s "side"');
    return 0;
  }
  if (values.json) io.out(JSON.stringify(inspection, null, 2));
  else io.out(inspectionText(inspection));
  return inspection.readable ? 0 : 1;
}
