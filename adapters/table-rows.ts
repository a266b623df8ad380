/**
 * The careful reading of one table row, given its cells: every rule checked one by one, and a rejection
 * that names the column at fault (as the file names it), what it holds, what is accepted and how to fix
 * it. A long row gives one frame (a sample with a marker gives both); a wide row one sample for each
 * muscle whose fascicle cell is not empty (a bad cell rejects that muscle's sample only), plus its event
 * and marker; an events row one event or marker.
 */
import { makeSample, type Frame, type GaitEventName, type Side } from '../src/trial/records.ts';
import { RECORD_KEY } from './device-mapping.ts';
import type { NameTable } from './lexing.ts';
import { markerFrame } from './old-link-marker.ts';
import { FIELD_RULE, makeRejection, MAX_ACTIVATION, MAX_PENNATION_DEG, MAX_QUALITY, MIN_ACTIVATION, MIN_PENNATION_DEG, MIN_QUALITY } from './parse-record.ts';
import { delimiterName } from './table-layout.ts';
import { tableNumber } from './table-cells.ts';
import { OWN_COLUMN, type TableField, type TablePlan, type WideColumns } from './table-plan.ts';

/** What a row reading needs besides its cells: the plan and the muscle names kept so far. */
export interface RowContext {
  readonly plan: TablePlan;
  readonly names: NameTable;
}

/** How a column is named in messages: our own columns bare (as the README names them), others quoted. */
function label(plan: TablePlan, field: TableField): string {
  const name = plan.names[field];
  return plan.own || name === OWN_COLUMN[field] ? name : `column "${name}"`;
}

function cell(cells: readonly string[], index: number): string {
  return index < 0 ? '' : (cells[index] ?? '');
}

const COMMA_NUMBER = /^[+-]?\d*,\d+(?:[eE][+-]?\d+)?$/;
const POINT_NUMBER = /^[+-]?\d*\.\d+(?:[eE][+-]?\d+)?$/;

/** "is empty", "is 5", or "is "x", not a decimal number" (with a word on the decimal mark when the cell uses the other). */
export function cellProblem(text: string, plan: TablePlan): string {
  if (text.length === 0) return 'is empty';
  const shown = JSON.stringify(text.length > 40 ? `${text.slice(0, 40)}…` : text);
  if (!Number.isNaN(tableNumber(text, plan.decimal))) return `is ${text}`;
  if (plan.decimal === '.' && COMMA_NUMBER.test(text)) {
    return `is ${shown}, not a decimal number with "." as its decimal mark (if the table uses decimal commas, say "table": {"decimal": ","} in a mapping)`;
  }
  if (plan.decimal === ',' && POINT_NUMBER.test(text)) {
    return `is ${shown}, not a decimal number with "," as its decimal mark (if the table uses decimal points, say "table": {"decimal": "."} in the mapping)`;
  }
  return `is ${shown}, not a decimal number`;
}

function rule(plan: TablePlan, field: TableField): string {
  const key = RECORD_KEY[field];
  if (plan.own) return FIELD_RULE[key] ?? '';
  switch (field) {
    case 't':
      return `must be a finite number (${plan.units.time} on the device clock)`;
    case 'fascicle':
      return `must be a finite number > 0 (${plan.units.length})`;
    case 'pennation':
      return `must be a number from ${MIN_PENNATION_DEG} to ${MAX_PENNATION_DEG} degrees once converted from ${plan.units.angle}, or left empty`;
    default:
      return FIELD_RULE[key] ?? '';
  }
}

/** The converted value in our unit, said after a value in the file's unit (nothing when it is ours). */
function converted(plan: TablePlan, value: number, unit: string, ours: string): string {
  return plan.own || unit === ours ? '' : ` (${value} ${ours})`;
}

function tooManyCells(plan: TablePlan, count: number, line: number, text: string): Frame {
  const d = plan.delimiter;
  const fix = d === ',' ? 'quote cells that contain commas ("a, b")' : `quote cells that contain the delimiter ${delimiterName(d)}`;
  return makeRejection('not_json', `row has ${count} cells but the header row has ${plan.header.length}: ${fix}, or add the extra column to the header row`, line, text);
}

/** A header row seen again: the same as the first (files joined end to end) gives a Header frame; any other is rejected. */
function headerAgain(plan: TablePlan, cells: readonly string[], line: number, text: string): Frame {
  let n = cells.length;
  while (n > plan.header.length && cells[n - 1] === '') n--;
  let same = n === plan.header.length;
  for (let i = 0; same && i < n; i++) same = cells[i] === plan.header[i];
  if (same) return { kind: 'header', muscles: Object.create(null) as Record<string, never>, line };
  return makeRejection(
    'schema',
    `row is a header row unlike the one on line ${plan.headerLine}: the columns of a file never change after its first header row, ` +
      'so this row is left out and the columns stay as they were; remove the row, or split the file where its columns change',
    line,
    text,
    plan.names.t,
  );
}

/** The row's time in seconds on the samples' clock, or the frame that the row is instead (a rejection, a header again). */
function rowTime(ctx: RowContext, cells: readonly string[], line: number, text: string): number | Frame {
  const plan = ctx.plan;
  const timeCell = cell(cells, plan.index.t);
  const raw = tableNumber(timeCell, plan.decimal);
  if (raw !== raw) {
    if (timeCell === plan.names.t) return headerAgain(plan, cells, line, text);
    return makeRejection('schema', `${label(plan, 't')} ${cellProblem(timeCell, plan)}: ${rule(plan, 't')}`, line, text, plan.names.t);
  }
  const tS = raw * plan.timeScale + plan.timeOffsetS;
  if (tS - tS !== 0) return makeRejection('out_of_range', `${label(plan, 't')} is ${timeCell}: ${rule(plan, 't')}`, line, text, plan.names.t);
  return tS;
}

function word(words: Readonly<Record<string, string>>, text: string): string {
  return Object.hasOwn(words, text) ? (words[text] as string) : text;
}

/** A gait event from its cells (the mapping's words turned into ours first). */
function eventFrame(ctx: RowContext, tS: number, eventCell: string, sideCell: string, line: number, text: string): Frame {
  const plan = ctx.plan;
  const event = word(plan.values.event, eventCell);
  if (event !== 'foot_strike' && event !== 'toe_off') {
    const fix = plan.own
      ? 'leave other device events out of the CSV, or use NDJSON, where they can be markers'
      : `turn the file's words into these in the mapping ("values": {"event": {${JSON.stringify(eventCell.slice(0, 40))}: "foot_strike"}}), or leave other events out`;
    const shown = JSON.stringify((event === eventCell ? eventCell : `${eventCell} → ${event}`).slice(0, 40));
    return makeRejection('unknown_event', `${label(plan, 'event')} is ${shown}: the gait events are foot_strike and toe_off; ${fix}`, line, text, plan.names.event);
  }
  const side = word(plan.values.side, sideCell);
  if (side !== 'left' && side !== 'right') {
    const shown = sideCell.length === 0 ? 'is empty' : `is ${JSON.stringify(sideCell.slice(0, 40))}`;
    const fix = plan.own ? FIELD_RULE['side'] : `must be left or right, or a word the mapping's "values": {"side": …} turns into one`;
    return makeRejection('schema', `${label(plan, 'side')} ${shown}: ${fix}`, line, text, plan.names.side);
  }
  return { kind: 'event', tS, event: event as GaitEventName, side: side as Side, line };
}

interface SampleColumns {
  readonly fascicle: string;
  readonly pennation: string;
  readonly quality: string;
  readonly activation: string;
  /** Column names, for the rejection's field. */
  readonly names: { readonly fascicle: string; readonly pennation: string; readonly quality: string; readonly activation: string };
  /** How each column is said in messages. */
  readonly labels: { readonly fascicle: string; readonly pennation: string; readonly quality: string; readonly activation: string };
}

/** A sample from its cells, converted to mm and degrees; or the rejection of the first cell that fails. */
function sampleFrame(ctx: RowContext, tS: number, muscle: string, c: SampleColumns, line: number, text: string): Frame {
  const plan = ctx.plan;
  const rawFascicle = tableNumber(c.fascicle, plan.decimal);
  const fascicleMm = rawFascicle * plan.lengthScale;
  if (!(fascicleMm > 0) || fascicleMm === Infinity) {
    const reason = rawFascicle === rawFascicle ? 'out_of_range' : 'schema';
    const mm = reason === 'out_of_range' ? converted(plan, fascicleMm, plan.units.length, 'mm') : '';
    return makeRejection(reason, `${c.labels.fascicle} ${cellProblem(c.fascicle, plan)}${mm}: ${rule(plan, 'fascicle')}`, line, text, c.names.fascicle);
  }
  let pennationDeg = Number.NaN;
  if (c.pennation.length > 0) {
    const raw = tableNumber(c.pennation, plan.decimal);
    pennationDeg = raw * plan.angleScale;
    if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) {
      const reason = raw === raw ? 'out_of_range' : 'schema';
      const deg = reason === 'out_of_range' ? converted(plan, pennationDeg, plan.units.angle, 'deg') : '';
      return makeRejection(reason, `${c.labels.pennation} ${cellProblem(c.pennation, plan)}${deg}: ${rule(plan, 'pennation')}`, line, text, c.names.pennation);
    }
  }
  let quality = 1;
  if (c.quality.length > 0) {
    quality = tableNumber(c.quality, plan.decimal);
    if (!(quality >= MIN_QUALITY && quality <= MAX_QUALITY)) {
      const reason = quality === quality ? 'out_of_range' : 'schema';
      return makeRejection(reason, `${c.labels.quality} ${cellProblem(c.quality, plan)}: ${rule(plan, 'quality')}`, line, text, c.names.quality);
    }
  }
  let activation = Number.NaN;
  if (c.activation.length > 0) {
    activation = tableNumber(c.activation, plan.decimal);
    if (!(activation >= MIN_ACTIVATION && activation <= MAX_ACTIVATION)) {
      const reason = activation === activation ? 'out_of_range' : 'schema';
      return makeRejection(reason, `${c.labels.activation} ${cellProblem(c.activation, plan)}: ${rule(plan, 'activation')}`, line, text, c.names.activation);
    }
  }
  return makeSample(tS, muscle, fascicleMm, pennationDeg, quality, line, activation);
}

/** Reads one row's cells into `out`. */
export function readRow(ctx: RowContext, cells: readonly string[], line: number, text: string, out: Frame[]): void {
  const plan = ctx.plan;
  if (cells.length > plan.header.length) {
    out.push(tooManyCells(plan, cells.length, line, text));
    return;
  }
  const tS = rowTime(ctx, cells, line, text);
  if (typeof tS !== 'number') {
    out.push(tS);
    return;
  }
  switch (plan.kind) {
    case 'long':
      longRow(ctx, tS, cells, line, text, out);
      return;
    case 'wide':
      wideRow(ctx, tS, cells, line, text, out);
      return;
    case 'events':
      eventsRow(ctx, tS, cells, line, text, out);
      return;
  }
}

function longRow(ctx: RowContext, tS: number, cells: readonly string[], line: number, text: string, out: Frame[]): void {
  const plan = ctx.plan;
  const ix = plan.index;
  const eventCell = cell(cells, ix.event);
  const muscleCell = cell(cells, ix.muscle);
  const fascicleCell = cell(cells, ix.fascicle);
  const pennationCell = cell(cells, ix.pennation);
  const qualityCell = cell(cells, ix.quality);
  const activationCell = cell(cells, ix.activation);
  const markerCell = cell(cells, ix.marker);
  if (eventCell.length > 0) {
    if (muscleCell.length > 0 || fascicleCell.length > 0 || pennationCell.length > 0 || qualityCell.length > 0 || activationCell.length > 0) {
      const sample = [plan.names.muscle, plan.names.fascicle, plan.names.pennation, plan.names.quality].join(', ');
      out.push(
        makeRejection(
          'schema',
          `row has both an event and sample cells: a row is either a sample (${sample}) or a gait event (${plan.names.event}, ${plan.names.side}); ` +
            'put them on two rows and leave the other cells empty',
          line,
          text,
          plan.names.event,
        ),
      );
      return;
    }
    out.push(eventFrame(ctx, tS, eventCell, cell(cells, ix.side), line, text));
    return;
  }
  if (muscleCell.length === 0) {
    if (markerCell.length > 0 && fascicleCell.length === 0 && pennationCell.length === 0 && qualityCell.length === 0 && activationCell.length === 0) {
      out.push(markerFrame(tS, markerCell, line));
      return;
    }
    const sideCell = cell(cells, ix.side);
    const what = fascicleCell.length === 0 && sideCell.length > 0 ? `${plan.names.event} is empty but ${plan.names.side} is given` : `${plan.names.muscle} is empty`;
    out.push(
      makeRejection(
        'schema',
        `${what}: a sample row needs ${plan.names.muscle} and ${plan.names.fascicle}, an event row needs ${plan.names.event} and ${plan.names.side}`,
        line,
        text,
        what.startsWith(plan.names.event) ? plan.names.event : plan.names.muscle,
      ),
    );
    return;
  }
  const muscle = ctx.names.intern(word(plan.values.muscle, muscleCell));
  const columns: SampleColumns = {
    fascicle: fascicleCell,
    pennation: pennationCell,
    quality: qualityCell,
    activation: activationCell,
    names: { fascicle: plan.names.fascicle, pennation: plan.names.pennation, quality: plan.names.quality, activation: plan.names.activation },
    labels: { fascicle: label(plan, 'fascicle'), pennation: label(plan, 'pennation'), quality: label(plan, 'quality'), activation: label(plan, 'activation') },
  };
  out.push(sampleFrame(ctx, tS, muscle, columns, line, text));
  if (markerCell.length > 0) out.push(markerFrame(tS, markerCell, line));
}

function wideLabels(m: WideColumns): SampleColumns['labels'] {
  return {
    fascicle: `column "${m.names.fascicle}" (${m.muscle} fascicle)`,
    pennation: `column "${m.names.pennation}" (${m.muscle} pennation)`,
    quality: `column "${m.names.quality}" (${m.muscle} quality)`,
    activation: `column "${m.names.activation}" (${m.muscle} activation)`,
  };
}

function wideRow(ctx: RowContext, tS: number, cells: readonly string[], line: number, text: string, out: Frame[]): void {
  const plan = ctx.plan;
  for (const m of plan.wide) {
    const fascicle = cell(cells, m.fascicle);
    if (fascicle.length === 0) continue;
    const columns: SampleColumns = {
      fascicle,
      pennation: cell(cells, m.pennation),
      quality: cell(cells, m.quality),
      activation: cell(cells, m.activation),
      names: m.names,
      labels: wideLabels(m),
    };
    out.push(sampleFrame(ctx, tS, m.muscle, columns, line, text));
  }
  const eventCell = cell(cells, plan.index.event);
  if (eventCell.length > 0) out.push(eventFrame(ctx, tS, eventCell, cell(cells, plan.index.side), line, text));
  const markerCell = cell(cells, plan.index.marker);
  if (markerCell.length > 0) out.push(markerFrame(tS, markerCell, line));
}

function eventsRow(ctx: RowContext, tS: number, cells: readonly string[], line: number, text: string, out: Frame[]): void {
  const plan = ctx.plan;
  const eventCell = cell(cells, plan.index.event);
  if (eventCell.length > 0) {
    out.push(eventFrame(ctx, tS, eventCell, cell(cells, plan.index.side), line, text));
    return;
  }
  const markerCell = cell(cells, plan.index.marker);
  if (markerCell.length > 0) {
    out.push(markerFrame(tS, markerCell, line));
    return;
  }
  out.push(
    makeRejection(
      'schema',
      `${label(plan, 'event')} is empty: a row of an events file is a gait event (${plan.names.event} and ${plan.names.side}) or a marker`,
      line,
      text,
      plan.names.event,
    ),
  );
}
