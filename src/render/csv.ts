/**
 * The one CSV writer of every command: a header and rows in, RFC 4180 text out, written by
 * csv-stringify (quoting of commas, quotes and line breaks; one "\n" after every record, no blank
 * line). Every row must have the header's number of fields, and every number must be finite:
 * anything else is an internal failure, never written (as toJsonText does for JSON).
 */
import { stringify } from 'csv-stringify/sync';

/** A CSV field: text, or a number written in full (String(x)), or '' for "no value". */
export type CsvCell = string | number;

export function csvText(header: readonly string[], rows: readonly (readonly CsvCell[])[]): string {
  rows.forEach((row, i) => {
    if (row.length !== header.length) {
      throw new Error(`internal: CSV row ${i + 1} has ${row.length} fields, the header ${header.length}`);
    }
  });
  return stringify([header, ...(rows as CsvCell[][])], {
    record_delimiter: 'unix',
    cast: {
      number: (x: number) => {
        if (!Number.isFinite(x)) throw new Error(`internal: a CSV value is not a finite number (${x})`);
        return String(x);
      },
    },
  });
}
