/**
 * The rejections of one input, counted by reason, with the first few kept whole: what a message needs
 * to say why an input gave nothing usable (the commonest reasons, the first bad lines and their fields).
 */
import type { Rejection } from './records.ts';
import { REASON_TEXT, type RejectReason } from './reasons.ts';

/** Rejections kept whole for messages; the rest are only counted. */
export const FIRST_REJECTIONS = 5;

export class RejectionTally {
  readonly byReason = new Map<RejectReason, number>();
  readonly first: Rejection[] = [];
  total = 0;

  add(r: Rejection): void {
    this.total++;
    this.byReason.set(r.reason, (this.byReason.get(r.reason) ?? 0) + 1);
    if (this.first.length < FIRST_REJECTIONS) this.first.push(r);
  }
}

/** "12 schema (valid JSON, but …); 3 not_json (…)", commonest first. */
export function reasonList(byReason: ReadonlyMap<string, number> | Readonly<Record<string, number>>): string {
  const entries = byReason instanceof Map ? [...byReason.entries()] : Object.entries(byReason);
  return entries
    .sort((a, b) => b[1] - a[1])
    .map(([reason, n]) => `${n} ${reason} (${REASON_TEXT[reason as RejectReason] ?? reason})`)
    .join('; ');
}

/** Where a rejection was: "line 3", or "calf.csv line 3" when several files feed the trial. */
export function rejectionPlace(r: Pick<Rejection, 'line' | 'file'>): string {
  return r.file === undefined ? `line ${r.line}` : `${r.file} line ${r.line}`;
}

/** The first rejected lines, one a line: "line 3 (fascicle_mm): fascicle_mm is -3: must be …" (the file first when several feed the trial). */
export function firstRejectionLines(first: readonly Rejection[]): string {
  return first.map((r) => `  ${rejectionPlace(r)}${r.field !== undefined ? ` (${r.field})` : ''}: ${r.message}`).join('\n');
}

/**
 * Why an input gave nothing usable: `what` ("valid sample", "gait event") and where, how many lines were
 * read, the commonest reasons and the first bad lines.
 */
export function nothingUsableMessage(what: string, source: string, lines: number, tally: RejectionTally, hint: string): string {
  if (lines === 0 && tally.total === 0) return `${source} is empty: no records; ${hint}`;
  let message = `${source} has no ${what} in ${lines} line${lines === 1 ? '' : 's'}`;
  if (tally.total > 0) message += ` (rejected: ${reasonList(tally.byReason)})`;
  message += `; ${hint}`;
  if (tally.first.length > 0) message += `\nfirst rejected lines:\n${firstRejectionLines(tally.first)}`;
  return message;
}
