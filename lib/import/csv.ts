/**
 * CSV imports: dyes and colours measured with an instrument. Each row is checked on its own and every
 * problem is named by its line (the header is line 1) and its column, in words a person can act on.
 * Pure: parsing and row checks only; the catalogue and solvent look-ups happen in db/queries.
 */
import Papa from "papaparse";
import { z } from "zod";
import { AppError } from "../errors";
import { dyeCreateJsonSchema } from "../validation/dye";
import { instrumentMeasurementSchema, type InstrumentMeasurement } from "../validation/instrument";

export type RowProblem = { line: number; column: string; message: string };
export type ParsedRow<T> = { line: number; value: T | null; problems: RowProblem[] };

import { DYE_COLUMNS, MEASUREMENT_COLUMNS, PH_SERIES_COLUMNS } from "./columns";

export { DYE_COLUMNS, MEASUREMENT_COLUMNS, PH_SERIES_COLUMNS };
const REQUIRED = { dyes: ["code", "name", "class"], measurements: ["dye", "solvent", "L", "a", "b", "white_point", "instrument"], "ph-series": ["pH", "L", "a", "b", "white_point"] } as const;
const EXPECTED = { dyes: DYE_COLUMNS, measurements: MEASUREMENT_COLUMNS, "ph-series": PH_SERIES_COLUMNS } as const;
/** Columns a kind of file must not have (the form gives them). */
const FORBIDDEN: Record<ImportKind, readonly string[]> = { dyes: [], measurements: [], "ph-series": ["dye", "solvent", "second_solvent", "second_solvent_x"] };

export type ImportKind = keyof typeof REQUIRED;

/** Parses the text; refuses a file without the required columns or with no rows, naming what is missing. */
export function parseCsv(text: string, kind: ImportKind): { rows: { line: number; cells: Record<string, string> }[]; fileProblem: string | null } {
  const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: "greedy", transformHeader: (h) => h.trim() });
  const fields = parsed.meta.fields ?? [];
  const missing = REQUIRED[kind].filter((c) => !fields.includes(c));
  if (missing.length) {
    return { rows: [], fileProblem: `The header (line 1) lacks the column${missing.length === 1 ? "" : "s"} ${missing.join(", ")}. Expected columns: ${EXPECTED[kind].join(", ")}.` };
  }
  const extra = FORBIDDEN[kind].filter((c) => fields.includes(c));
  if (extra.length) return { rows: [], fileProblem: `The header (line 1) has the column${extra.length === 1 ? "" : "s"} ${extra.join(", ")}; the dye and the medium of a pH series are chosen in the form, so remove ${extra.length === 1 ? "it" : "them"}.` };
  // Papa counts rows from 0 after the header; with no quoted line breaks, data row i is on line i + 2.
  const rows = parsed.data.map((cells, i) => ({ line: i + 2, cells }));
  if (rows.length === 0) return { rows, fileProblem: "The file has a header but no rows." };
  return { rows, fileProblem: null };
}

const cell = (cells: Record<string, string>, key: string) => (cells[key] ?? "").trim();

function numberCell(cells: Record<string, string>, key: string, line: number, problems: RowProblem[], what: string): number | null {
  const raw = cell(cells, key);
  if (raw === "") return null;
  const n = Number(raw.replace(",", "."));
  if (!Number.isFinite(n)) {
    problems.push({ line, column: key, message: `${what} “${raw}” is not a number.` });
    return null;
  }
  return n;
}

function issuesToProblems(error: z.ZodError, line: number, columnOf: (path: PropertyKey[]) => string): RowProblem[] {
  return error.issues.map((i) => ({ line, column: columnOf(i.path), message: i.message }));
}

export function checkDyeRows(rows: { line: number; cells: Record<string, string> }[]): ParsedRow<z.infer<typeof dyeCreateJsonSchema>>[] {
  const seen = new Map<string, number>();
  return rows.map(({ line, cells }) => {
    const input = {
      code: cell(cells, "code"),
      name: cell(cells, "name"),
      class: cell(cells, "class"),
      casNumber: cell(cells, "cas_number"),
      molarMass: cell(cells, "molar_mass"),
      synonyms: cell(cells, "synonyms").replace(/;/g, ","),
      notes: cell(cells, "notes"),
      hazards: cell(cells, "hazards"),
    };
    const columns: Record<string, string> = { casNumber: "cas_number", molarMass: "molar_mass", dyeClass: "class" };
    const r = dyeCreateJsonSchema.safeParse(input);
    const problems = r.success ? [] : issuesToProblems(r.error, line, (p) => columns[String(p[0])] ?? String(p[0] ?? "code"));
    const key = input.code.toLowerCase();
    if (key && seen.has(key)) problems.push({ line, column: "code", message: `The code ${input.code} is already on line ${seen.get(key)}.` });
    else if (key) seen.set(key, line);
    return { line, value: r.success && problems.length === 0 ? r.data : null, problems };
  });
}

const MEASUREMENT_FIELD_COLUMN: Record<string, string> = {
  dye: "dye",
  whitePoint: "white_point",
  observer: "observer",
  instrument: "instrument",
  uncertaintyDeltaE00: "u_delta_e00",
  flagReason: "flag_reason",
  solvent: "solvent",
  acidBase: "acid_base",
  pH: "pH",
  concentrationUmolL: "concentration_umol_l",
  additive: "additive",
  additiveConcentrationMolL: "additive_mol_l",
  temperatureC: "temperature_c",
  pathLengthMm: "path_length_mm",
  secondSolvent: "second_solvent",
  secondSolventMoleFraction: "second_solvent_x",
};

export function measurementColumn(path: PropertyKey[]): string {
  if (path[0] === "lab") return ["L", "a", "b"][Number(path[1] ?? 0)] ?? "L";
  if (path[0] === "condition") return MEASUREMENT_FIELD_COLUMN[String(path[1])] ?? "solvent";
  return MEASUREMENT_FIELD_COLUMN[String(path[0])] ?? String(path[0]);
}

export function checkMeasurementRows(rows: { line: number; cells: Record<string, string> }[]): ParsedRow<InstrumentMeasurement>[] {
  return rows.map(({ line, cells }) => {
    const problems: RowProblem[] = [];
    const L = numberCell(cells, "L", line, problems, "L*");
    const a = numberCell(cells, "a", line, problems, "a*");
    const b = numberCell(cells, "b", line, problems, "b*");
    for (const [k, v] of [["L", L], ["a", a], ["b", b]] as const) if (v === null && cell(cells, k) === "") problems.push({ line, column: k, message: `Give ${k}* as a number.` });
    const input = {
      dye: cell(cells, "dye"),
      lab: [L ?? NaN, a ?? NaN, b ?? NaN],
      whitePoint: cell(cells, "white_point").toUpperCase(),
      observer: cell(cells, "observer") || "2",
      instrument: cell(cells, "instrument"),
      uncertaintyDeltaE00: numberCell(cells, "u_delta_e00", line, problems, "The uncertainty"),
      flagReason: cell(cells, "flag_reason"),
      condition: {
        solvent: cell(cells, "solvent"),
        acidBase: cell(cells, "acid_base") || "neutral",
        pH: numberCell(cells, "pH", line, problems, "pH"),
        concentrationUmolL: numberCell(cells, "concentration_umol_l", line, problems, "The dye concentration"),
        additive: cell(cells, "additive"),
        additiveConcentrationMolL: numberCell(cells, "additive_mol_l", line, problems, "The amount of acid or base"),
        temperatureC: numberCell(cells, "temperature_c", line, problems, "The temperature"),
        pathLengthMm: numberCell(cells, "path_length_mm", line, problems, "The path length"),
        secondSolvent: cell(cells, "second_solvent") || null,
        secondSolventMoleFraction: numberCell(cells, "second_solvent_x", line, problems, "The mole fraction"),
      },
    };
    if (problems.length) return { line, value: null, problems };
    const r = instrumentMeasurementSchema.safeParse(input);
    if (!r.success) return { line, value: null, problems: issuesToProblems(r.error, line, measurementColumn) };
    return { line, value: r.data, problems: [] };
  });
}

/** acid_base of a series vial when the file gives none: acid below pH 6, base above pH 8, neutral between (our convention, as in the demo). */
export function acidBaseOfPh(pH: number): "acid" | "neutral" | "base" {
  return pH < 6 ? "acid" : pH > 8 ? "base" : "neutral";
}

/**
 * The rows of a pH-series file as measurement rows: the form's dye and medium (and instrument, when a
 * row names none) filled in, acid_base from the pH when absent. A row without a pH gets a problem.
 */
export function phSeriesRowsAsMeasurements(
  rows: { line: number; cells: Record<string, string> }[],
  form: { dye: string; solvent: string; secondSolvent: string | null; secondSolventX: number | null; instrument: string },
): { rows: { line: number; cells: Record<string, string> }[]; problems: RowProblem[] } {
  const problems: RowProblem[] = [];
  const out = rows.map(({ line, cells }) => {
    const pHText = cell(cells, "pH");
    const pH = Number(pHText.replace(",", "."));
    if (pHText === "") problems.push({ line, column: "pH", message: "Give the vial's pH." });
    const filled: Record<string, string> = {
      ...cells,
      dye: form.dye,
      solvent: form.solvent,
      second_solvent: form.secondSolvent ?? "",
      second_solvent_x: form.secondSolventX === null ? "" : String(form.secondSolventX),
      instrument: cell(cells, "instrument") || form.instrument,
      acid_base: cell(cells, "acid_base") || (pHText !== "" && Number.isFinite(pH) ? acidBaseOfPh(pH) : ""),
    };
    return { line, cells: filled };
  });
  return { rows: out, problems };
}

export type ImportCheck = { rows: number; good: number; problems: RowProblem[]; moreProblems: number; preview: Record<string, unknown>[] };

/**
 * What a checked file answers: its summary (problems by line, at most 200 listed) and, for "preview",
 * the message that nothing is stored yet. "all" with any problem is refused here, naming the first.
 */
export function checkedImport({ mode, rows, good, problems, preview }: { mode: "preview" | "all" | "good"; rows: number; good: number; problems: RowProblem[]; preview: Record<string, unknown>[] }): {
  summary: ImportCheck;
  previewMessage: string | null;
} {
  const sorted = [...problems].sort((a, b) => a.line - b.line);
  const summary = { rows, good, problems: sorted.slice(0, 200), moreProblems: Math.max(0, sorted.length - 200), preview };
  if (mode === "preview") {
    return {
      summary,
      previewMessage: sorted.length ? `${rows} rows checked: ${good} good, ${rows - good} with problems (listed by line and column). Nothing is stored yet.` : `${rows} rows checked, all good. Nothing is stored until you import.`,
    };
  }
  if (mode === "all" && sorted.length) {
    throw new AppError("invalid_input", `Nothing was stored: ${rows - good} of ${rows} rows have problems. The first is line ${sorted[0].line}, column ${sorted[0].column}: ${sorted[0].message}`);
  }
  return { summary, previewMessage: null };
}
