import fs from "node:fs";
import { readFile } from "node:fs/promises";
import { parseArgs } from "node:util";
import { isModelRefusal } from "../models/errors";
import { parsePropertyCsv, type TableSolvent } from "../models/property-csv";
import { designRow, fitScaleModel, SCALE_MODELS, termsOf, type ScaleModel } from "../models/solvent-scales";
import { CliError } from "./errors";

const FIT_USAGE = "use 'fit <csv> [--model kamlet-taft|et30|permittivity]'";

/** The solvent table: the database's when DATA_DIR holds one (it may have added solvents), else the shipped panel. */
async function loadSolventTable(): Promise<TableSolvent[]> {
  const [{ databaseFile, migrateDatabase, openDatabase }, { dataDir }, { solvents }, { buildSolventTable }] = await Promise.all([
    import("../../db/connection"),
    import("../config/env"),
    import("../../db/schema"),
    import("../../db/seed/solvent-table"),
  ]);
  const toTable = (rows: { name: string; synonyms?: string[] | null; ktPiStar?: number | null; ktAlpha?: number | null; ktBeta?: number | null; et30?: number | null; permittivity?: number | null }[]) =>
    rows.map((s) => ({
      name: s.name,
      synonyms: s.synonyms ?? [],
      parameters: { piStar: s.ktPiStar ?? null, alpha: s.ktAlpha ?? null, beta: s.ktBeta ?? null, et30: s.et30 ?? null, permittivity: s.permittivity ?? null },
    }));
  const file = databaseFile(dataDir());
  if (fs.existsSync(file)) {
    const db = openDatabase(file);
    try {
      migrateDatabase(db);
      return toTable(db.select().from(solvents).all());
    } finally {
      db.$client.close();
    }
  }
  return toTable(buildSolventTable());
}

export async function fitCommand(args: string[]): Promise<unknown> {
  let parsed;
  try {
    parsed = parseArgs({ args, options: { model: { type: "string" } }, strict: true, allowPositionals: true });
  } catch (error) {
    throw new CliError(`${(error as Error).message.replace(/\.\s.*$|\.$/, "")}; ${FIT_USAGE}.`);
  }
  const { values, positionals } = parsed;
  if (positionals.length !== 1) throw new CliError(positionals.length === 0 ? `Give the CSV file to fit; ${FIT_USAGE}.` : `Give one CSV file, not ${positionals.length}; ${FIT_USAGE}.`);
  const model = (values.model ?? "kamlet-taft").toLowerCase() as ScaleModel;
  if (!SCALE_MODELS.includes(model)) throw new CliError(`Unknown model '${values.model}'; choose kamlet-taft, et30 or permittivity.`);
  const file = positionals[0];
  let bytes: Buffer;
  try {
    bytes = await readFile(file);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === "ENOENT") throw new CliError(`The file ${file} does not exist; check the path.`);
    if (code === "EISDIR") throw new CliError(`The path ${file} is a folder, not a file; give the path of the CSV file.`);
    throw new CliError(`The file ${file} cannot be read (${code ?? "unknown error"}); check the path and its permissions.`);
  }
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new CliError("The file is not UTF-8 text; save it as a plain CSV file.");
  }
  if (text.includes("\u0000")) throw new CliError("The file is not a text CSV file; save it as a plain CSV file.");
  try {
    const table = parsePropertyCsv(text, await loadSolventTable());
    const terms = termsOf(model);
    for (const row of table.rows) {
      const d = designRow(terms, row.parameters);
      if ("missing" in d) {
        if (!row.known) throw new CliError(`The solvent '${row.solvent}' is not in the solvent table; use a name or abbreviation from the table or give its ${d.missing.join(", ")} in columns.`);
        throw new CliError(`The solvent table has no ${d.missing.join(", ")} for ${row.solvent}; give it in a ${d.missing.join(", ")} column or leave that solvent out.`);
      }
    }
    const fits = table.properties.map((property, k) => {
      const fit = fitScaleModel(model, table.rows.map((r) => ({ solvent: r.solvent, parameters: r.parameters, value: r.values[k] })), { property });
      return { property, coefficients: fit.coefficients, r2: fit.r2, looRmse: fit.looRmse, residualStdErr: fit.residualStdErr, conditionNumber: fit.conditionNumber, vif: fit.vif };
    });
    return { model, n: table.rows.length, fits };
  } catch (error) {
    if (isModelRefusal(error)) throw new CliError(error.message);
    throw error;
  }
}
