/**
 * Reads the `fit` command's CSV: a `solvent` column, one or more numeric property columns, and optional
 * parameter columns (`pi_star`, `alpha`, `beta`, `et30`, `permittivity`) that supply or override a
 * solvent's parameters. Pure: the solvent table is passed in.
 */
import Papa from "papaparse";
import { ModelRefusal } from "./errors";
import type { SolventParameters } from "./solvent-scales";

export type TableSolvent = { name: string; synonyms: readonly string[]; parameters: SolventParameters };

export type PropertyTable = {
  properties: string[];
  rows: { solvent: string; known: boolean; parameters: SolventParameters; values: number[] }[];
};

const PARAMETER_COLUMNS: Record<string, keyof SolventParameters> = {
  pi_star: "piStar",
  alpha: "alpha",
  beta: "beta",
  et30: "et30",
  permittivity: "permittivity",
  delta: "delta",
};

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

const refuse = (message: string): never => {
  throw new ModelRefusal("invalid-input", message);
};

/** Case-insensitive index of the table by name and every synonym. */
export function solventIndex(table: readonly TableSolvent[]): Map<string, TableSolvent> {
  const index = new Map<string, TableSolvent>();
  for (const s of table) for (const key of [s.name, ...s.synonyms]) index.set(key.trim().toLowerCase(), s);
  return index;
}

export function parsePropertyCsv(text: string, table: readonly TableSolvent[]): PropertyTable {
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ""), { skipEmptyLines: "greedy" });
  const lines = parsed.data;
  if (lines.length === 0) refuse("The CSV file is empty; give a header row with a solvent column and one or more property columns.");
  const header = lines[0].map((h) => h.trim());
  const lower = header.map((h) => h.toLowerCase());
  const solventCol = lower.indexOf("solvent");
  if (solventCol < 0) refuse(`The header row "${header.join(",").slice(0, 60)}" has no solvent column; name one column "solvent".`);
  const propertyCols = header.map((_, i) => i).filter((i) => i !== solventCol && !(lower[i] in PARAMETER_COLUMNS) && header[i] !== "");
  if (propertyCols.length === 0) refuse("The CSV has no property column to fit; add a numeric column such as wavenumber or ET.");
  const index = solventIndex(table);
  const rows: PropertyTable["rows"] = [];
  for (let r = 1; r < lines.length; r++) {
    const cells = lines[r];
    const line = r + 1;
    if (cells.length > header.length) refuse(`Line ${line} has ${cells.length} values but the header names ${header.length} columns; quote names that contain commas.`);
    const name = (cells[solventCol] ?? "").trim();
    if (!name) refuse(`Line ${line} has no solvent name; give one in every row.`);
    const number = (col: number, what: string, optional: boolean): number | null => {
      const s = (cells[col] ?? "").trim();
      if (s === "") return optional ? null : refuse(`Line ${line} has no ${what}; give a number in every property column.`);
      if (!NUMBER.test(s)) refuse(`Line ${line} has "${s.slice(0, 20)}" as its ${what}; give plain numbers with a dot as the decimal separator.`);
      return Number(s);
    };
    const values = propertyCols.map((c) => number(c, header[c], false) as number);
    const found = index.get(name.toLowerCase());
    const parameters: SolventParameters = { ...(found?.parameters ?? {}) };
    lower.forEach((h, c) => {
      if (!(h in PARAMETER_COLUMNS)) return;
      const v = number(c, h, true);
      if (v !== null) parameters[PARAMETER_COLUMNS[h]] = v;
    });
    if (parameters.permittivity != null && parameters.permittivity < 1) refuse(`Line ${line} gives a permittivity below 1; relative permittivity is at least 1.`);
    rows.push({ solvent: found?.name ?? name, known: found !== undefined, parameters, values });
  }
  if (rows.length === 0) refuse("The CSV has a header but no rows; give one row per solvent.");
  return { properties: propertyCols.map((c) => header[c]), rows };
}
