/**
 * The one CSV writer for every export. RFC 4180 quoting and CRLF line ends via papaparse; text cells
 * that a spreadsheet would run as a formula (starting with = + - @, tab or carriage return) get a
 * leading apostrophe, as the OWASP "CSV Injection" page recommends (papaparse's escapeFormulae).
 * Numbers stay numbers, so a negative a* is written as -35.2, not '-35.2. Pure.
 */
import Papa from "papaparse";

export type CsvCell = string | number | boolean | null | undefined;

export function writeCsv(fields: readonly string[], rows: readonly (readonly CsvCell[])[]): string {
  const data = rows.map((row) => row.map((cell) => (cell === null || cell === undefined ? "" : cell)));
  return Papa.unparse({ fields: [...fields], data }, { newline: "\r\n", escapeFormulae: true }) + "\r\n";
}

/** A file name safe on every OS, from a person-given name. */
export function csvFileName(name: string, fallback: string): string {
  const base = name.normalize("NFKD").replace(/[^\w.-]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60);
  return `${base || fallback}.csv`;
}
