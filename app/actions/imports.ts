"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { saveInstrumentMeasurements } from "@/db/queries/bench";
import { checkInstrumentRows } from "@/db/queries/instrument-import";
import { addDyes, existingDyeCodes } from "@/db/queries/dyes";
import { formAction } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { checkDyeRows, checkedImport, parseCsv, type RowProblem } from "@/lib/import/csv";

const importSchema = z.object({
  kind: z.enum(["dyes", "measurements"], { error: "Choose what the file holds: dyes or measurements." }),
  csv: z.string().min(1, { error: "Choose a CSV file first." }).max(5_000_000, { error: "The file is larger than 5 MB; split it into smaller files." }),
  mode: z.enum(["preview", "all", "good"]).default("preview"),
});

/**
 * Checks a CSV file row by row and, when asked, stores it: "all" stores nothing unless every row is
 * good; "good" stores the good rows only (the person chose to). Every write is one transaction.
 */
export const importCsvAction = formAction({ access: BENCH_ROLES, schema: importSchema }, async ({ kind, csv, mode }, { user }) => {
  const { rows, fileProblem } = parseCsv(csv, kind);
  if (fileProblem) throw new AppError("invalid_input", fileProblem);
  if (rows.length > 5000) throw new AppError("invalid_input", `The file has ${rows.length} rows; import at most 5000 at a time.`);
  const handle = db();
  const problems: RowProblem[] = [];
  let preview: Record<string, unknown>[] = [];
  let good = 0;
  let store: () => number = () => 0;

  if (kind === "dyes") {
    const checked = checkDyeRows(rows);
    const taken = existingDyeCodes(handle, checked.flatMap((r) => (r.value ? [r.value.code] : [])));
    for (const r of checked) {
      if (r.value && taken.has(r.value.code.toLowerCase())) {
        r.problems.push({ line: r.line, column: "code", message: `A dye with the code ${r.value.code} is already in the catalogue.` });
        r.value = null;
      }
      problems.push(...r.problems);
    }
    const ok = checked.filter((r) => r.value);
    good = ok.length;
    preview = ok.slice(0, 20).map((r) => ({ line: r.line, code: r.value!.code, name: r.value!.name, class: r.value!.dyeClass, casNumber: r.value!.casNumber, molarMass: r.value!.molarMass }));
    store = () => addDyes(handle, { actorId: user.id, list: ok.map((r) => r.value!) });
  } else {
    const { items, problems: rowProblems } = checkInstrumentRows(handle, rows);
    problems.push(...rowProblems);
    good = items.length;
    preview = items.slice(0, 20).map(({ line, item }) => ({ line, lab: item.lab.map((v) => Math.round(v * 100) / 100), sent: item.sent, flags: item.flags, instrument: item.instrument }));
    store = () => saveInstrumentMeasurements(handle, { actorId: user.id, items: items.map((i) => i.item) }).length;
  }

  const { summary, previewMessage } = checkedImport({ mode, rows: rows.length, good, problems, preview });
  if (previewMessage) return { ok: true, message: previewMessage, data: summary };
  if (good === 0) throw new AppError("invalid_input", "Nothing was stored: no row is good.");
  const n = store();
  revalidatePath(kind === "dyes" ? "/catalogue" : "/review");
  return {
    ok: true,
    message: `Imported ${n} ${kind === "dyes" ? (n === 1 ? "dye" : "dyes") : n === 1 ? "measurement; it waits" : "measurements; they wait"}${kind === "dyes" ? "" : " for review"}.${mode === "good" && problems.length ? ` ${rows.length - good} rows with problems were left out.` : ""}`,
    data: { ...summary, imported: n },
  };
});
