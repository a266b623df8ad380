import { describe, expect, it } from 'vitest';
import { findTableLayout } from '../../adapters/table-layout.ts';
import { layoutQuery, tableReading } from '../../adapters/table-plan.ts';

const lines = (text: string): { text: string; line: number }[] => text.split('\n').map((t, i) => ({ text: t, line: i + 1 }));

describe('an events file that lacks one of our columns', () => {
  it('names the mapping key that would rename the column', () => {
    const found = findTableLayout(lines('time_s\tevent\n1.0\tfoot_strike'), layoutQuery(tableReading(null, 'events')));
    expect(found).toMatchObject({
      ok: false,
      problem: expect.stringContaining(`lacks column "side" (our own column; a mapping's events.fields.side names yours)`),
    });
  });
});
