import { z } from "zod";
import { db } from "@/db/client";
import { findDyeById } from "@/db/queries/dyes";
import { findSpectrum, prepareSpectrum, saveSpectrum, spectraForDye, type DyeSpectrum } from "@/db/queries/spectra";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE, BENCH_ROLES } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { problemsSentence } from "@/lib/import/spectrum";
import { spectrumUploadSchema } from "@/lib/validation/spectrum";

function spectrumJson(s: DyeSpectrum) {
  return {
    id: s.id,
    condition: { solvent: s.solvent, acidBase: s.acidBase, pH: s.pH },
    lambdaMaxNm: s.lambdaMaxNm,
    concentrationUmolL: s.concentrationUmolL,
    pathLengthMm: s.pathLengthMm,
    instrument: s.instrument,
    originalName: s.originalName,
    sentIn: s.wavelengthUnit,
    points: s.points,
  };
}

const query = z.object({ dyeId: z.string({ error: "Give dyeId, the dye's id (see GET /api/dyes?q=)." }).trim().min(1, { error: "Give dyeId, the dye's id (see GET /api/dyes?q=)." }).max(100) });

/** A dye's stored absorbance spectra: points [[nm, decadic absorbance], …] and λmax (null: no band maximum in the visible). */
export const GET = apiRoute({ access: ANY_ROLE, query }, async ({ query: q }) => {
  const handle = db();
  if (!findDyeById(handle, { id: q.dyeId })) throw new AppError("not_found", "No dye has this id; look it up with GET /api/dyes?q=.");
  return { spectra: spectraForDye(handle, { dyeId: q.dyeId }).map(spectrumJson) };
});

/**
 * Stores one absorbance spectrum (chemists, admins) for a dye and condition, as points or as CSV text,
 * after the same checks as the upload panel: units, order, duplicates, 400–700 nm covered, step,
 * numeric absorbance. Any problem stores nothing and answers 422 naming the line (or point) and column.
 */
export const POST = apiRoute({ access: BENCH_ROLES, body: spectrumUploadSchema }, async ({ body, user }) => {
  const handle = db();
  const prepared = prepareSpectrum(handle, body);
  if (!prepared.ok) {
    const where = body.csv !== undefined ? "line" : "point";
    // Every problem, keyed "line 12.absorbance" (or "point 3.wavelength", or the field such as "solvent").
    const fields: Record<string, string[]> = {};
    for (const p of prepared.problems) (fields[p.line === 0 ? p.column : `${where} ${p.line}.${p.column}`] ??= []).push(p.message);
    throw new AppError("invalid_input", problemsSentence(prepared.problems, where), fields);
  }
  const id = saveSpectrum(handle, { actorId: user.id, item: prepared.item });
  return Response.json({ spectrum: spectrumJson(findSpectrum(handle, { id })!), report: prepared.preview.report, warnings: prepared.preview.warnings }, { status: 201 });
});
