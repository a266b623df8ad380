/** The table-driven check the line parsers share: each row a line the parser must reject, and why. */
import { expect, it } from 'vitest';
import type { RejectReason } from '../../src/trial/reasons.ts';

/** One test per row, named "rejects NAME as REASON": `reasonOf(line)` must give the row's reason. */
export function itRejectsEach(reasonOf: (line: string) => string | null, rows: readonly (readonly [name: string, reason: RejectReason, line: string])[]): void {
  it.each(rows)('rejects %s as %s', (_name, reason, line) => {
    expect(reasonOf(line)).toBe(reason);
  });
}
