/**
 * The one CSV writer of Arcwright's exports (flights, a session's flights, a flight's track), on the `csv-stringify`
 * package. Every export:
 * - starts with a UTF-8 byte-order mark, so spreadsheet programs read accented names (é, ø) correctly;
 * - follows RFC 4180: comma separated, CRLF line ends, a field holding a comma, quote or line break in double quotes
 *   with quotes doubled, `.` decimals;
 * - defuses text that a spreadsheet would run as a formula: a text cell starting with `=`, `+`, `-`, `@`, a tab or a
 *   carriage return gets a leading `'` (the usual defence against CSV formula injection); numbers are written as
 *   numbers, so a negative value stays `-1.5`;
 * - names the unit of every measured column (`carry_m` or `carry_ft`, see `unitColumn` in shared/units.ts).
 */
import { stringify } from 'csv-stringify/sync';

/** A cell: text, a number (written as is; round with {@link roundCell}), or nothing (an empty cell). */
export type CsvCell = string | number | null | undefined;

/** A download: its file name and text. */
export interface CsvFile {
  filename: string;
  csv: string;
}

export const UTF8_BOM = '\uFEFF';

/** Characters that make a spreadsheet read a cell as a formula when they come first. */
const FORMULA_START = /^[=+\-@\t\r]/;

/** A text cell made safe to open in a spreadsheet: a leading formula character gets a `'` in front. */
export function defuseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** A number rounded to `digits` decimals for a cell (no negative zero); null (an empty cell) when not finite. */
export function roundCell(value: number | null | undefined, digits: number): number | null {
  if (value === null || value === undefined || !Number.isFinite(value)) return null;
  // Adding 0 folds a rounded negative zero away.
  return Number(value.toFixed(digits)) + 0;
}

/** A whole CSV document: BOM, the header, one record per row, CRLF after each record. */
export function csvDocument(header: readonly string[], rows: readonly (readonly CsvCell[])[]): string {
  const body = stringify([header as string[], ...(rows as CsvCell[][])], {
    record_delimiter: '\r\n',
    // A lone CR or a tab inside a field is quoted too, so no reader splits the record there.
    quoted_match: /[\r\t]/,
    cast: { string: defuseFormula, number: (n) => String(n) },
  });
  return UTF8_BOM + body;
}

/** A download's file name from its parts: `arcwright-flights-2026-03-14.csv`; anything but letters, digits and - becomes -. */
export function csvFileName(...parts: (string | number)[]): string {
  const safe = parts.map((p) => String(p).toLowerCase().replace(/[^a-z0-9-]+/g, '-').replace(/^-+|-+$/g, '')).filter(Boolean);
  return `${['arcwright', ...safe].join('-')}.csv`;
}
