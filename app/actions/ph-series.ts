"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { pkaText } from "@/components/acid-base/format";
import { db } from "@/db/client";
import { checkInstrumentRows } from "@/db/queries/instrument-import";
import { deletePhSeries, ensurePhSeriesFit, getPhSeries, importPhSeries, savePhSeries } from "@/db/queries/ph-series";
import { formAction, parseInput } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { checkedImport, parseCsv, phSeriesRowsAsMeasurements } from "@/lib/import/csv";
import { phSeriesHeadSchema, phSeriesSchema } from "@/lib/validation/ph-series";

/** The series form sends its state as one JSON field (vials with their pH). */
const seriesPayload = z.object({
  payload: z
    .string()
    .max(1_000_000)
    .transform((text, ctx) => {
      try {
        return JSON.parse(text) as unknown;
      } catch {
        ctx.addIssue({ code: "custom", message: "The series could not be read; reload the page and try again." });
        return z.NEVER;
      }
    }),
});

function refreshPages(dyeCode?: string) {
  revalidatePath("/acid-base", "layout");
  if (dyeCode) revalidatePath(`/catalogue/${encodeURIComponent(dyeCode)}`);
}

/**
 * Creates a series (no id) or replaces its name, medium and vials (with id). The fit is computed right
 * after the write (outside the transaction), so the dye page and the pH search find it stored.
 */
export const savePhSeriesAction = formAction({ access: BENCH_ROLES, schema: seriesPayload }, async ({ payload }, { user }) => {
  const input = parseInput(phSeriesSchema, payload, "form");
  const handle = db();
  const id = savePhSeries(handle, { actorId: user.id, input });
  const fit = ensurePhSeriesFit(handle, { seriesId: id });
  refreshPages();
  const fitted = fit.ok ? `${pkaText(fit)} from ${fit.vials} accepted vials.` : `No pKa yet: ${fit.error}`;
  return { ok: true, message: `Series “${input.head.name}” saved with ${input.vials.length} vials. ${fitted}`, data: { id } };
});

/**
 * The chemist's choice for a series: one colour change (one pKa) or two (H2In ⇌ HIn⁻ ⇌ In²⁻, two pKa's).
 * The fit is redone at once with that choice and stored with it.
 */
export const setPhFitStepsAction = formAction(
  { access: BENCH_ROLES, schema: z.object({ id: z.string().min(1, { error: "Choose a series first." }).max(100), steps: z.enum(["1", "2"], { error: "Choose one step or two steps." }) }) },
  async ({ id, steps }, { user }) => {
    const handle = db();
    if (!getPhSeries(handle, { id })) throw new AppError("not_found", "That series no longer exists.");
    const fit = ensurePhSeriesFit(handle, { seriesId: id, steps: steps === "2" ? 2 : 1, actorId: user.id });
    refreshPages();
    return { ok: true, message: fit.ok ? `Fitted with ${steps === "2" ? "two steps" : "one step"}: ${pkaText(fit)}.` : `Fitted with ${steps === "2" ? "two steps" : "one step"}, no pKa: ${fit.error}` };
  },
);

export const deletePhSeriesAction = formAction({ access: BENCH_ROLES, schema: z.object({ id: z.string().min(1, { error: "Choose a series first." }).max(100) }) }, async ({ id }, { user }) => {
  deletePhSeries(db(), { actorId: user.id, id });
  refreshPages();
  return { ok: true, message: "Series deleted; its measurements are kept." };
});

const numberText = (v: string | undefined) => (v === undefined || v.trim() === "" ? null : Number(v.replace(",", ".")));

const importSchema = z.object({
  dyeId: z.string().max(100).optional().default(""),
  name: z.string().max(200).optional().default(""),
  solventId: z.string().max(100).optional().default(""),
  secondSolventId: z.string().max(100).optional(),
  secondSolventMoleFraction: z.string().max(40).optional(),
  ionicStrengthMolL: z.string().max(40).optional(),
  notes: z.string().max(2000).optional().default(""),
  instrument: z.string().max(200).optional().default(""),
  csv: z.string().min(1, { error: "Choose a CSV file first." }).max(2_000_000, { error: "The file is larger than 2 MB; a pH series is far smaller: check the file." }),
  mode: z.enum(["preview", "all"]).default("preview"),
});

/**
 * Imports a pH series from CSV (one vial per row: pH, L, a, b, white_point, …): every row checked and
 * every problem named by line and column; "preview" stores nothing, "all" stores the colours (pending
 * review) and the series in one transaction, and only when every row is good.
 */
export const importPhSeriesAction = formAction({ access: BENCH_ROLES, schema: importSchema }, async (form, { user }) => {
  const head = parseInput(
    phSeriesHeadSchema,
    { ...form, secondSolventId: form.secondSolventId || null, secondSolventMoleFraction: numberText(form.secondSolventMoleFraction), ionicStrengthMolL: numberText(form.ionicStrengthMolL) },
    "form",
  );
  const parsed = parseCsv(form.csv, "ph-series");
  if (parsed.fileProblem) throw new AppError("invalid_input", parsed.fileProblem);
  if (parsed.rows.length > 500) throw new AppError("invalid_input", `The file has ${parsed.rows.length} rows; a series holds at most 500 vials.`);
  const handle = db();
  const filled = phSeriesRowsAsMeasurements(parsed.rows, { dye: head.dyeId, solvent: head.solventId, secondSolvent: head.secondSolventId, secondSolventX: head.secondSolventMoleFraction, instrument: form.instrument.trim() });
  const checked = checkInstrumentRows(handle, filled.rows);
  const problems = [...filled.problems, ...checked.problems];
  const bad = new Set(problems.map((p) => p.line));
  const items = checked.items.filter((i) => !bad.has(i.line)).map(({ line, item }) => ({ line, pH: item.condition.ph!, item }));
  const preview = items.slice(0, 30).map(({ line, pH, item }) => ({ line, pH, lab: item.lab.map((v) => Math.round(v * 100) / 100), acidBase: item.condition.acidBase, instrument: item.instrument }));
  const { summary, previewMessage } = checkedImport({ mode: form.mode, rows: parsed.rows.length, good: items.length, problems, preview });
  if (previewMessage) return { ok: true, message: previewMessage, data: summary };
  const { id, measurementIds } = importPhSeries(handle, { actorId: user.id, head, items: items.map(({ pH, item }) => ({ pH, item })) });
  refreshPages();
  revalidatePath("/review");
  return { ok: true, message: `Imported series “${head.name}” with ${measurementIds.length} vials; the colours wait for review, and the pKa is fitted from the accepted ones.`, data: { ...summary, imported: measurementIds.length, id } };
});
