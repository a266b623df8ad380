/**
 * Rows of our own CSV columns for the table readers' property tests, written by an independent CSV writer
 * (csv-stringify, RFC 4180 quoting where needed), so the readers are held to a writer that is not ours.
 */
import fc from 'fast-check';
import { stringify } from 'csv-stringify/sync';

/** Our own columns in their usual order. */
export const OWN_HEADER = 'time_s,muscle,fascicle_mm,pennation_deg,quality,event,side';

/** One row as the independent writer writes it, with the given delimiter, line ending left off. */
export function csvRow(cells: readonly string[], delimiter = ','): string {
  return stringify([cells], { delimiter, record_delimiter: '\n' }).replace(/\n$/, '');
}

/** Rows of our seven columns, numbers and words drawn from these, with up to `maxDropped` trailing cells left off. */
export function ownColumnRows(number: fc.Arbitrary<string>, text: fc.Arbitrary<string>, maxDropped: number): fc.Arbitrary<string> {
  return fc
    .tuple(number, text, number, number, number, text, text, fc.integer({ min: 0, max: maxDropped }))
    .map(([t, muscle, fascicle, pennation, quality, event, side, drop]) => {
      const cells = [t, muscle, fascicle, pennation, quality, event, side];
      return csvRow(cells.slice(0, cells.length - drop));
    });
}

/** Header rows of our columns: in order, reversed, with unknown columns in place of the optional ones, and `another`. */
export function ownHeaders(another: string): fc.Arbitrary<string> {
  return fc.constantFrom(OWN_HEADER, 'side,event,quality,pennation_deg,fascicle_mm,muscle,time_s', 'time_s,muscle,fascicle_mm,x,y,z,w', another);
}
