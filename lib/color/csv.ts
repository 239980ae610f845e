import { ColorInputError } from "./errors";

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Reads a small numeric CSV: a header row naming (at least) `columns` in any order (case-insensitive,
 * other columns ignored), then one row of plain decimal numbers per line. Blank lines and a BOM are
 * skipped. `what` names the file in messages ("spectrum", "pH series"). Throws `ColorInputError`
 * naming the offending line.
 */
export function parseNumericCsv(text: string, columns: readonly string[], what: string): number[][] {
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  const first = lines.findIndex((l) => l.trim() !== "");
  const headerHint = columns.join(",");
  if (first < 0) throw new ColorInputError(`The ${what} file is empty; give a CSV with the header ${headerHint} and one row per measurement.`);
  const cells = (line: string) => line.split(",").map((c) => c.trim().replace(/^"(.*)"$/, "$1").trim());
  const header = cells(lines[first]).map((h) => h.toLowerCase());
  const index = columns.map((c) => header.indexOf(c.toLowerCase()));
  if (index.some((i) => i < 0)) {
    throw new ColorInputError(`The ${what}'s header row is "${lines[first].trim().slice(0, 60)}"; it must name the columns ${headerHint}.`);
  }
  const rows: number[][] = [];
  for (let i = first + 1; i < lines.length; i++) {
    if (lines[i].trim() === "") continue;
    const c = cells(lines[i]);
    if (c.length > header.length) {
      throw new ColorInputError(`Line ${i + 1} of the ${what} has ${c.length} values but the header names ${header.length} columns; use a dot, not a comma, as the decimal separator.`);
    }
    rows.push(
      index.map((k, j) => {
        const s = c[k];
        if (s === undefined || s === "") throw new ColorInputError(`Line ${i + 1} of the ${what} has no ${columns[j]}; give a number in every column.`);
        if (!NUMBER.test(s)) {
          throw new ColorInputError(`Line ${i + 1} of the ${what} has "${s.slice(0, 20)}" as its ${columns[j]}; give plain numbers with a dot as the decimal separator.`);
        }
        return Number(s);
      }),
    );
  }
  return rows;
}
