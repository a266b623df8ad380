import fc from 'fast-check';
import { stringify } from 'csv-stringify/sync';
import { describe, expect, it } from 'vitest';
import { parseCells, plainCells, rowCells, tableNumber } from '../../adapters/table-cells.ts';
import type { Delimiter } from '../../adapters/device-mapping.ts';

const DELIMITERS: readonly Delimiter[] = [',', ';', '\t', '|'];

describe('rowCells', () => {
  it('gives back any cells an independent CSV writer wrote, for each delimiter', () => {
    // Cells with white space at their ends lose it (cells are trimmed), so the property keeps cells trimmed.
    const cell = fc.string({ maxLength: 8 }).filter((c) => !/[\n\r]/.test(c) && c === c.trim());
    fc.assert(
      fc.property(fc.constantFrom(...DELIMITERS), fc.array(cell, { minLength: 1, maxLength: 6 }), (delimiter, cells) => {
        const written = stringify([cells], { delimiter, record_delimiter: '\n', quoted_match: /^\s|\s$/ }).replace(/\n$/, '');
        const read = rowCells(written, delimiter);
        expect(read).toEqual({ ok: true, cells: cells.length === 1 && cells[0] === '' ? [''] : cells });
      }),
      { numRuns: 2000 },
    );
  });

  it('splits a row without quotes in place exactly as csv-parse does', () => {
    const char = fc.constantFrom('a', '1', ' ', '\t', ',', ';', '|', '\r', '\u00a0', '\u3000', '\ufeff', 'é');
    fc.assert(
      fc.property(fc.constantFrom(...DELIMITERS), fc.array(char, { maxLength: 12 }).map((cs) => cs.join('')), (delimiter, text) => {
        expect(parseCells(text, delimiter)).toEqual({ ok: true, cells: plainCells(text, delimiter) });
      }),
      { numRuns: 3000 },
    );
  });

  it('reads quoted cells with delimiters and doubled quotes, and says when quoting is broken', () => {
    expect(rowCells('1;"calf; medial";"say ""hi""";', ';')).toEqual({ ok: true, cells: ['1', 'calf; medial', 'say "hi"', ''] });
    expect(rowCells('x, "quoted" ,y', ',')).toEqual({ ok: true, cells: ['x', 'quoted', 'y'] });
    for (const broken of ['"open', '"closed"after,x', 'in"side,x']) expect(rowCells(broken, ',').ok).toBe(false);
  });
});

describe('tableNumber', () => {
  it('reads decimal numbers only, with a decimal point', () => {
    expect(tableNumber('52.3')).toBe(52.3);
    expect(tableNumber('-1e-3')).toBe(-0.001);
    expect(tableNumber('.5')).toBe(0.5);
    expect(tableNumber('1e400')).toBe(Infinity);
    for (const bad of ['', ' ', '0x10', 'NaN', 'Infinity', '1,5', '1.2.3', 'e5']) expect(tableNumber(bad)).toBeNaN();
  });

  it('reads decimal commas as the same numbers, and refuses points with them', () => {
    expect(tableNumber('52,3', ',')).toBe(52.3);
    expect(tableNumber('-0,001', ',')).toBe(-0.001);
    expect(tableNumber('7', ',')).toBe(7);
    for (const bad of ['52.3', '1.234,5', '1,2,3', ',']) expect(tableNumber(bad, ',')).toBeNaN();
  });
});
