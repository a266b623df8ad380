import { stringify } from 'csv-stringify/sync';
import { describe, expect, it } from 'vitest';
import { findTableLayout, guessTableLayout, type LayoutQuery } from '../../adapters/table-layout.ts';

function lines(text: string): { text: string; line: number }[] {
  return text
    .split('\n')
    .map((t, i) => ({ text: t.replace(/\r$/, ''), line: i + 1 }))
    .filter((l) => l.text.trim() !== '');
}

const WANT: LayoutQuery = {
  table: {},
  identify: [
    { name: 'Time (ms)', from: 'fields.t' },
    { name: 'LG fascicle (cm)', from: 'muscles.lat_gastroc.fascicle' },
  ],
  numeric: ['Time (ms)', 'LG fascicle (cm)'],
};

/** A table as an independent CSV writer writes it, under a few lines of notes. */
function table(delimiter: string, rows: string[][], notes: string[] = []): string {
  return [...notes, stringify(rows, { delimiter })].join('\n');
}

describe('findTableLayout', () => {
  it.each([',', ';', '\t', '|'])('finds the header row below notes, and the delimiter %j', (delimiter) => {
    const decimal = delimiter === ',' ? '.' : ',';
    const text = table(
      delimiter,
      [
        ['Time (ms)', 'LG fascicle (cm)'],
        ['0', `5${decimal}2`],
        ['10', `5${decimal}3`],
      ],
      ['Exported by the tracking station', 'Subject: invented 01; session 2', ''],
    );
    const found = findTableLayout(lines(text), WANT);
    expect(found).toEqual({
      ok: true,
      layout: { delimiter, delimiterFrom: 'found', decimal, decimalFrom: delimiter === ',' ? 'default' : 'found', headerLine: 4, header: ['Time (ms)', 'LG fascicle (cm)'] },
    });
  });

  it('takes the settings the mapping gives', () => {
    const found = findTableLayout(lines('note\nTime (ms);LG fascicle (cm)\n0;5,2'), { ...WANT, table: { delimiter: ';', decimal: '.', skipLines: 1 } });
    expect(found).toMatchObject({ ok: true, layout: { delimiterFrom: 'mapping', decimal: '.', decimalFrom: 'mapping', headerLine: 2 } });
  });

  it('refuses a skip_lines that points past the header row, saying how to count', () => {
    const found = findTableLayout(lines('note\nTime (ms);LG fascicle (cm)\n0;5,2'), { ...WANT, table: { skipLines: 4 } });
    expect(found).toMatchObject({ ok: false, line: 5, problem: expect.stringContaining('count every line above the header row, blank ones too') });
  });

  it('refuses a table whose numbers use both decimal marks', () => {
    const found = findTableLayout(lines('Time (ms);LG fascicle (cm)\n0;5,2\n0.5;5.3'), WANT);
    expect(found).toMatchObject({ ok: false, problem: expect.stringContaining('both decimal marks ("," on line 2, "." on line 3)') });
  });

  it('refuses a header row that two delimiters both split into the named columns', () => {
    const query: LayoutQuery = { table: {}, identify: [{ name: 'a', from: 'fields.t' }], numeric: [] };
    const found = findTableLayout(lines('a;b|a\n1;2|3'), query);
    expect(found).toMatchObject({ ok: false, problem: expect.stringContaining('split at ";" and at "|"') });
  });

  it('names the columns a mapping names and the file lacks, with the columns the file has', () => {
    const found = findTableLayout(lines('Time (ms);LG fasc (cm);VL\n0;5;6'), WANT);
    expect(found).toEqual({
      ok: false,
      line: 1,
      problem:
        'the header row (line 1) lacks column "LG fascicle (cm)" (muscles.lat_gastroc.fascicle); did you mean "LG fasc (cm)"?; ' +
        'it has "Time (ms)", "LG fasc (cm)", "VL". Add the missing column or fix its name in the file or the mapping',
    });
  });
});

describe('guessTableLayout', () => {
  it('finds a table of unknown columns below notes: header row, delimiter, decimal mark and a first row', () => {
    const text = table(
      '\t',
      [
        ['Time (ms)', 'LG fascicle (cm)', 'LG conf'],
        ['0', '5,2', '0,9'],
        ['10', '5,3', '0,8'],
      ],
      ['Invented recording station export', ''],
    );
    expect(guessTableLayout(lines(text))).toMatchObject({ delimiter: '\t', decimal: ',', headerLine: 3, header: ['Time (ms)', 'LG fascicle (cm)', 'LG conf'], firstRow: ['0', '5,2', '0,9'] });
  });

  it('finds nothing in text that is not a table', () => {
    expect(guessTableLayout(lines('just some notes\nand more notes'))).toBeNull();
  });
});
