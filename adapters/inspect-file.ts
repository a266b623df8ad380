/**
 * How a file will be read, without running the pipeline: its layout, the column used for each field and
 * the conversion applied, each muscle with its side and where the side comes from, counts by kind and
 * rejections by reason with the first bad lines, and each muscle's time span, rate, gaps and fascicle
 * range. The file streams through the same readers the commands use; what is kept is bounded (a few
 * figures per muscle, the first few rejections).
 */
import { lastValueFrom, tap } from 'rxjs';
import type { Frame, Rejection, Side } from '../src/trial/records.ts';
import { RejectionTally } from '../src/trial/rejection-tally.ts';
import { REASON_TEXT } from '../src/trial/reasons.ts';
import { DEG_PER, MM_PER, S_PER, type DeviceMapping } from './device-mapping.ts';
import { fileSource, SourceFormatError, type SourceLayout } from './file-source.ts';
import { readLines } from './read-lines.ts';
import { shiftTimes } from './shift-times.ts';
import { suggestTableMapping, type MappingSkeleton } from './suggest-mapping.ts';
import { guessTableLayout, LAYOUT_LINES, type FirstLine } from './table-layout.ts';
import type { TablePlan } from './table-plan.ts';

export type SideSource = 'option' | 'mapping' | 'header' | 'first_foot_strike';

export interface InspectedColumn {
  readonly field: string;
  /** The muscle whose column it is (a table with a column per muscle), else null. */
  readonly muscle: string | null;
  readonly column: string;
  /** The conversion applied, in words: "ms → s: × 0.001, then + 0 s", "as is". */
  readonly conversion: string;
}

export interface InspectedMuscle {
  readonly side: Side | null;
  readonly side_source: SideSource | null;
  readonly samples: number;
  readonly first_s: number | null;
  readonly last_s: number | null;
  /** Samples per second over the muscle's span. */
  readonly rate_hz: number | null;
  /** Intervals between successive samples longer than the gap threshold, and the longest. */
  readonly gaps: number;
  readonly longest_gap_s: number | null;
  readonly fascicle_mm: { readonly min: number; readonly max: number; readonly mean: number } | null;
  readonly warnings: readonly string[];
}

export interface InspectedRejection {
  readonly line: number;
  readonly reason: string;
  readonly field: string | null;
  readonly message: string;
}

export interface InspectedCounts {
  readonly lines: number;
  readonly samples: number;
  readonly events: number;
  readonly markers: number;
  readonly headers: number;
  readonly rejected: number;
  readonly rejected_by_reason: Readonly<Record<string, number>>;
}

export interface InspectedEvents {
  readonly file: string;
  readonly readable: boolean;
  readonly problem: string | null;
  readonly counts: InspectedCounts;
  readonly first_s: number | null;
  readonly last_s: number | null;
  readonly first_rejections: readonly InspectedRejection[];
}

export interface Inspection {
  readonly format: 'lengthwise-inspection';
  readonly version: 1;
  readonly file: string;
  readonly readable: boolean;
  readonly problem: string | null;
  readonly layout: 'ndjson' | 'long' | 'wide' | null;
  readonly table: {
    readonly delimiter: string;
    readonly delimiter_from: string;
    readonly decimal: string;
    readonly decimal_from: string;
    readonly header_line: number;
    readonly columns: readonly string[];
  } | null;
  readonly columns: readonly InspectedColumn[];
  readonly muscles: Readonly<Record<string, InspectedMuscle>>;
  readonly counts: InspectedCounts;
  readonly first_rejections: readonly InspectedRejection[];
  readonly events_file: InspectedEvents | null;
  readonly suggested_mapping: MappingSkeleton | null;
}

export interface InspectOptions {
  readonly mapping?: DeviceMapping | null;
  readonly eventsPath?: string | undefined;
  /** Sides given with --side. */
  readonly sides?: Readonly<Record<string, Side>>;
  /** Intervals longer than this are gaps, seconds (the pipeline's threshold). */
  readonly gapS: number;
  /** Added to the file's times after the mapping's conversion (a trial description's recording on its joint clock). */
  readonly timeOffsetS?: number;
  /** The side of the first foot strike found elsewhere (a trial description's events file), for muscles without one. */
  readonly firstStrike?: Side | null;
}

/** Fascicle lengths (mm, mean over the muscle) that look like another unit; human fascicles are some 30–150 mm (common practice, no source). */
const LOOKS_LIKE: readonly { readonly below: number; readonly above: number; readonly unit: string }[] = [
  { below: 1, above: 0, unit: 'metres (0.05 for 50 mm): "units": {"length": "m"}' },
  { below: 15, above: 1, unit: 'centimetres (5 for 50 mm): "units": {"length": "cm"}' },
  { below: Infinity, above: 1000, unit: 'micrometres, or another column: check "fascicle" in the mapping' },
];

class MuscleTally {
  samples = 0;
  firstS = Number.NaN;
  lastS = Number.NaN;
  gaps = 0;
  longestGapS = 0;
  min = Infinity;
  max = -Infinity;
  sum = 0;

  add(tS: number, fascicleMm: number, gapS: number): void {
    if (this.samples === 0) this.firstS = tS;
    else if (tS > this.lastS) {
      const dt = tS - this.lastS;
      if (dt > gapS) this.gaps++;
      if (dt > this.longestGapS) this.longestGapS = dt;
    }
    if (!(tS < this.lastS)) this.lastS = tS;
    this.samples++;
    if (fascicleMm < this.min) this.min = fascicleMm;
    if (fascicleMm > this.max) this.max = fascicleMm;
    this.sum += fascicleMm;
  }

  figures(side: Side | null, source: SideSource | null): InspectedMuscle {
    const mean = this.sum / this.samples;
    const span = this.lastS - this.firstS;
    const warnings = LOOKS_LIKE.filter((w) => mean < w.below && mean > w.above).map(
      (w) => `fascicle lengths average ${mean.toPrecision(3)} mm, which looks like ${w.unit}`,
    );
    if (side === null) warnings.push('no side: its strides are cut at foot strikes of neither side until one is given (--side NAME=left|right, or "muscles" in a mapping)');
    return {
      side,
      side_source: source,
      samples: this.samples,
      first_s: this.samples > 0 ? this.firstS : null,
      last_s: this.samples > 0 ? this.lastS : null,
      rate_hz: this.samples > 1 && span > 0 ? (this.samples - 1) / span : null,
      gaps: this.gaps,
      longest_gap_s: this.samples > 1 ? this.longestGapS : null,
      fascicle_mm: this.samples > 0 ? { min: this.min, max: this.max, mean } : null,
      warnings,
    };
  }
}

class FrameTally {
  lines = 0;
  samples = 0;
  events = 0;
  markers = 0;
  headers = 0;
  firstS = Number.NaN;
  lastS = Number.NaN;
  firstStrike: Side | null = null;
  readonly rejections = new RejectionTally();
  readonly muscles = new Map<string, MuscleTally>();
  readonly headerSides = new Map<string, Side>();

  constructor(private readonly gapS: number) {}

  add(f: Frame): void {
    if ('line' in f && f.line > this.lines) this.lines = f.line;
    if ('tS' in f && Number.isFinite(f.tS)) {
      if (!(f.tS >= this.firstS)) this.firstS = f.tS;
      if (!(f.tS <= this.lastS)) this.lastS = f.tS;
    }
    switch (f.kind) {
      case 'sample': {
        let m = this.muscles.get(f.muscle);
        if (m === undefined) this.muscles.set(f.muscle, (m = new MuscleTally()));
        // The pipeline's own order check (orderPerMuscle), said here too so that the counts match a replay's.
        if (m.samples > 0 && f.tS <= m.lastS) {
          const reason = f.tS === m.lastS ? 'duplicate' : 'time_not_increasing';
          this.rejections.add({ kind: 'rejection', reason, message: `${f.muscle} at ${f.tS} s: ${REASON_TEXT[reason]}`, line: f.line, excerpt: '' });
          return;
        }
        this.samples++;
        m.add(f.tS, f.fascicleMm, this.gapS);
        return;
      }
      case 'event':
        this.events++;
        if (f.event === 'foot_strike' && this.firstStrike === null) this.firstStrike = f.side;
        return;
      case 'marker':
      case 'disconnection':
        this.markers++;
        return;
      case 'header':
        this.headers++;
        for (const [name, d] of Object.entries(f.muscles)) if (d.side !== undefined) this.headerSides.set(name, d.side);
        return;
      case 'rejection':
        this.rejections.add(f);
        return;
      default:
        return;
    }
  }

  counts(): InspectedCounts {
    return {
      lines: this.lines,
      samples: this.samples,
      events: this.events,
      markers: this.markers,
      headers: this.headers,
      rejected: this.rejections.total,
      rejected_by_reason: Object.fromEntries(this.rejections.byReason),
    };
  }

  first(): InspectedRejection[] {
    return this.rejections.first.map((r: Rejection) => ({ line: r.line, reason: r.reason, field: r.field ?? null, message: r.message }));
  }
}

function scale(from: string, to: string, factor: number, offsetS = 0): string {
  if (factor === 1 && offsetS === 0) return 'as is';
  const times = factor === 1 ? '' : `${from} → ${to}: × ${Number(factor.toPrecision(12))}`;
  const plus = offsetS === 0 ? '' : `+ ${offsetS} s`;
  return [times, plus].filter((p) => p !== '').join(', then ');
}

function tableColumns(plan: TablePlan): InspectedColumn[] {
  const out: InspectedColumn[] = [];
  const conversion: Record<string, string> = {
    t: scale(plan.units.time, 's', S_PER[plan.units.time], plan.timeOffsetS),
    fascicle: scale(plan.units.length, 'mm', MM_PER[plan.units.length]),
    pennation: scale(plan.units.angle, 'deg', DEG_PER[plan.units.angle]),
  };
  for (const [field, index] of Object.entries(plan.index)) {
    if (index < 0) continue;
    const words = field === 'event' || field === 'side' || field === 'muscle' ? Object.keys(plan.values[field]).length : 0;
    out.push({ field, muscle: null, column: plan.names[field as keyof TablePlan['names']], conversion: conversion[field] ?? (words > 0 ? `the mapping's ${words} words turned into ours` : 'as is') });
  }
  for (const m of plan.wide) {
    out.push({ field: 'fascicle', muscle: m.muscle, column: m.names.fascicle, conversion: conversion['fascicle'] as string });
    if (m.pennation >= 0) out.push({ field: 'pennation', muscle: m.muscle, column: m.names.pennation, conversion: conversion['pennation'] as string });
    if (m.quality >= 0) out.push({ field: 'quality', muscle: m.muscle, column: m.names.quality, conversion: 'as is' });
  }
  return out;
}

function ndjsonColumns(mapping: DeviceMapping | null): InspectedColumn[] {
  if (mapping === null) return [];
  const conversion: Record<string, string> = {
    t: scale(mapping.timeUnit, 's', S_PER[mapping.timeUnit], mapping.timeOffsetS),
    fascicle: scale(mapping.lengthUnit, 'mm', MM_PER[mapping.lengthUnit]),
    pennation: scale(mapping.angleUnit, 'deg', DEG_PER[mapping.angleUnit]),
  };
  return Object.entries(mapping.fields).map(([field, column]) => ({ field, muscle: null, column, conversion: conversion[field] ?? 'as is' }));
}

/** The file's first non-blank lines, for a guess at its layout. */
async function firstLines(path: string): Promise<FirstLine[]> {
  const lines: FirstLine[] = [];
  try {
    await lastValueFrom(
      readLines(path, { batchLines: LAYOUT_LINES }).pipe(
        tap((b) => b.texts.forEach((text, i) => lines.length < LAYOUT_LINES && lines.push({ text, line: b.lineNumbers[i] as number }))),
      ),
      { defaultValue: undefined },
    );
  } catch {
    // Unreadable: no guess.
  }
  return lines;
}

/** Reads an events file through the mapping's "events" section and says how it is read. */
export async function inspectEvents(path: string, mapping: DeviceMapping | null, gapS: number): Promise<{ events: InspectedEvents; firstStrike: Side | null }> {
  const tally = new FrameTally(gapS);
  let problem: string | null = null;
  try {
    await lastValueFrom(fileSource(path, { mapping, role: 'events' }).pipe(tap((b) => b.forEach((f) => tally.add(f)))), { defaultValue: undefined });
  } catch (error) {
    problem = (error as Error).message;
  }
  if (problem === null && tally.events === 0) problem = `${path} has no usable gait event`;
  return {
    events: {
      file: path,
      readable: problem === null,
      problem,
      counts: tally.counts(),
      first_s: Number.isFinite(tally.firstS) ? tally.firstS : null,
      last_s: Number.isFinite(tally.lastS) ? tally.lastS : null,
      first_rejections: tally.first(),
    },
    firstStrike: tally.firstStrike,
  };
}

/** Reads the file (and the events file) through the commands' readers and says how they are read. */
export async function inspectFile(path: string, options: InspectOptions): Promise<Inspection> {
  const mapping = options.mapping ?? null;
  const tally = new FrameTally(options.gapS);
  let layout: SourceLayout | null = null;
  let problem: string | null = null;
  let notTable = false;
  try {
    await lastValueFrom(
      fileSource(path, { mapping, onLayout: (l) => (layout = l) }).pipe(
        shiftTimes(options.timeOffsetS ?? 0),
        tap((b) => b.forEach((f) => tally.add(f))),
      ),
      { defaultValue: undefined },
    );
  } catch (error) {
    problem = (error as Error).message;
    notTable = error instanceof SourceFormatError;
  }
  if (problem === null && tally.samples === 0) problem = `${path} has no valid sample`;
  const events = options.eventsPath === undefined ? null : await inspectEvents(options.eventsPath, mapping, options.gapS);
  const firstStrike = tally.firstStrike ?? events?.firstStrike ?? options.firstStrike ?? null;

  const muscles: Record<string, InspectedMuscle> = {};
  for (const [name, m] of tally.muscles) {
    const given = options.sides?.[name];
    const mapped = mapping?.muscles[name]?.side;
    const header = tally.headerSides.get(name);
    const [side, source]: [Side | null, SideSource | null] =
      given !== undefined ? [given, 'option'] : mapped !== undefined ? [mapped, 'mapping'] : header !== undefined ? [header, 'header'] : firstStrike !== null ? [firstStrike, 'first_foot_strike'] : [null, null];
    muscles[name] = m.figures(side, source);
  }

  let suggested: MappingSkeleton | null = null;
  if (notTable && mapping === null) {
    const guess = guessTableLayout(await firstLines(path));
    if (guess !== null) suggested = suggestTableMapping(guess);
  }
  const l = layout as SourceLayout | null;
  return {
    format: 'lengthwise-inspection',
    version: 1,
    file: path,
    readable: problem === null && (events === null || events.events.readable),
    problem: problem ?? events?.events.problem ?? null,
    layout: l === null ? null : l.format === 'ndjson' ? 'ndjson' : l.plan.kind === 'wide' ? 'wide' : 'long',
    table:
      l === null || l.format !== 'csv'
        ? null
        : {
            delimiter: l.layout.delimiter,
            delimiter_from: l.layout.delimiterFrom,
            decimal: l.layout.decimal,
            decimal_from: l.layout.decimalFrom,
            header_line: l.layout.headerLine,
            columns: l.layout.header,
          },
    columns: l === null ? [] : l.format === 'csv' ? tableColumns(l.plan) : ndjsonColumns(mapping),
    muscles,
    counts: tally.counts(),
    first_rejections: tally.first(),
    events_file: events?.events ?? null,
    suggested_mapping: suggested,
  };
}
