"use server";

import { revalidatePath } from "next/cache";
import { db } from "@/db/client";
import { prepareSpectrum, saveSpectrum } from "@/db/queries/spectra";
import { formAction, parseInput } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { problemsSentence } from "@/lib/import/spectrum";
import { spectrumFormSchema, spectrumFormToUpload, spectrumUploadSchema } from "@/lib/validation/spectrum";

/**
 * The dye page's spectrum upload (chemists, admins): "preview" checks the file and the condition and
 * returns the converted points, λmax and colour; "save" checks again and stores it in one transaction.
 * The same checks as POST /api/spectra (db/queries/spectra.ts). Nothing is stored on any problem.
 */
export const uploadSpectrumAction = formAction({ access: BENCH_ROLES, schema: spectrumFormSchema }, async (form, { user }) => {
  const handle = db();
  const upload = parseInput(spectrumUploadSchema, spectrumFormToUpload(form), "form");
  const prepared = prepareSpectrum(handle, upload);
  if (!prepared.ok) {
    return { ok: false, code: "invalid_input", message: problemsSentence(prepared.problems, "line"), data: { problems: prepared.problems.slice(0, 200), warnings: prepared.warnings } };
  }
  const { preview, item } = prepared;
  const peak = item.lambdaMaxNm === null ? "no band maximum in the visible" : `λmax ${item.lambdaMaxNm.toFixed(1)} nm`;
  if (form.mode === "preview") {
    return { ok: true, message: `${preview.report.points} samples checked, all good (${peak}). Nothing is stored until you save.`, data: { preview } };
  }
  saveSpectrum(handle, { actorId: user.id, item });
  revalidatePath("/catalogue/[code]", "page");
  return { ok: true, message: `Saved the spectrum (${peak}); it is in the spectra above and in the solvent model.`, data: { saved: true } };
});
