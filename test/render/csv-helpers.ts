/**
 * A strict reading of the CSV every command writes: RFC 4180 (https://www.rfc-editor.org/rfc/rfc4180)
 * as read by csv-parse with nothing relaxed. A blank line, a row with another number of fields
 * than the header, a stray quote or a repeated column name is an error here, as it would be in a
 * spreadsheet import or `pandas.read_csv(..., on_bad_lines='error')`.
 */
import { parse } from 'csv-parse/sync';

export interface StrictCsv {
  header: string[];
  rows: string[][];
  /** Rows as objects keyed by the header. */
  records: Record<string, string>[];
}

export function parseCsvStrict(text: string): StrictCsv {
  if (!text.endsWith('\n')) throw new Error('CSV output does not end with a newline');
  if (/\r/.test(text)) throw new Error('CSV output holds a carriage return (records end with \\n)');
  const all: string[][] = parse(text, {
    bom: false,
    cast: false,
    delimiter: ',',
    quote: '"',
    escape: '"',
    record_delimiter: '\n',
    relax_column_count: false,
    relax_quotes: false,
    skip_empty_lines: false,
    skip_records_with_empty_values: false,
    skip_records_with_error: false,
    trim: false,
  });
  if (all.length === 0) throw new Error('CSV output is empty');
  const header = all[0]!;
  if (new Set(header).size !== header.length) throw new Error(`CSV header repeats a column: ${header.join(',')}`);
  if (header.some((h) => h === '')) throw new Error('CSV header has an empty column name');
  const rows = all.slice(1);
  const records = rows.map((r) => Object.fromEntries(header.map((h, i) => [h, r[i]!])));
  return { header, rows, records };
}

/** A field that must hold a number: a finite number written in full (no NaN, no Infinity, not empty). */
export function csvNumber(field: string | undefined): number {
  if (field === undefined || field.trim() === '' || !/^-?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(field)) {
    throw new Error(`CSV field "${field}" is not a number`);
  }
  return Number(field);
}
