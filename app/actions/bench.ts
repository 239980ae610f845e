"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { deleteRackTemplate, deleteSolventPanel, earlierReplicates, saveMeasurements, saveRackTemplate, saveSolventPanel } from "@/db/queries/bench";
import { getPhoto, measureOnPhoto } from "@/db/queries/photos";
import { adminEmails, getProfile, standardOrRefuse } from "@/db/queries/lighting";
import { DRIFT_LIMIT_DE00 } from "@/lib/bench/pipeline";
import { send } from "@/lib/mail";
import { formAction, parseInput } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { checkStandardRefusal } from "@/lib/bench/checks";
import { checkReplicate, replicateFlags } from "@/lib/bench/replicates";
import { panelSchema, saveRequestSchema, templateSchema } from "@/lib/bench/schemas";
import { AppError } from "@/lib/errors";
import { objectStore } from "@/lib/storage";
import { photoLimits } from "@/lib/storage/limits";

/**
 * Tells the admins by e-mail about references that drifted past the limit. Called only once the save
 * has committed (mail cannot be part of the transaction); a mail failure does not undo the save, it
 * is logged and named in the chemist's message instead.
 */
async function mailDrift(photoId: string, profileId: string | null, flagged: { label: string; deltaE00: number }[]): Promise<string> {
  if (flagged.length === 0 || !profileId) return "";
  const handle = db();
  const profile = getProfile(handle, profileId);
  const text = [
    `A bench photo's references no longer match the lighting profile “${profile?.name ?? profileId}”:`,
    ...flagged.map((f) => `- ${f.label}: ${f.deltaE00.toFixed(2)} ΔE00 (limit ${DRIFT_LIMIT_DE00} ΔE00)`),
    "",
    "The measurements from this photo are flagged. Check the light and the camera settings, and re-fit the profile if the light has changed.",
    `Photo: /bench/photos/${photoId}   Profile: /lighting/profiles/${profileId}`,
  ].join("\n");
  try {
    for (const to of adminEmails(handle)) await send({ to, subject: `Light drift on “${profile?.name ?? profileId}”`, text });
    return "";
  } catch (error) {
    console.error("Drift mail not sent:", error);
    return " The admins could not be e-mailed about the light drift; tell them yourself.";
  }
}

const jsonPayload = z.object({ payload: z.string().min(2, { error: "Nothing to save." }).max(2_000_000) });

function parseJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError("invalid_input", "The marking could not be read; reload the page and try again.");
  }
}

/**
 * Saves the marked vials and check standards of a photo. The colours are measured again here, on the
 * stored photo: what the browser showed is never trusted as the record. Flagged vials need a reason, or
 * nothing is saved. Vials, drift and check readings are one transaction; the drift mail follows the commit.
 */
export const saveMeasurementsAction = formAction({ access: BENCH_ROLES, schema: jsonPayload }, async ({ payload }, { user }) => {
  const input = parseInput(saveRequestSchema, parseJson(payload));
  const handle = db();
  const photo = getPhoto(handle, input.photoId);
  if (!photo) throw new AppError("not_found", "That photo no longer exists.");
  const checks = input.checkStandards ?? [];
  const checkNames = checks.map((c) => `“${standardOrRefuse(handle, c.standardId).name}”`);
  const needsCorrection = checks.length > 0 ? checkStandardRefusal({ lightingProfileId: input.lightingProfileId, referenceCount: input.references.length }) : null;
  if (needsCorrection) throw new AppError("invalid_input", needsCorrection, { checkStandards: [needsCorrection] });
  const measured = await measureOnPhoto(handle, objectStore(), photo, {
    lightingProfileId: input.lightingProfileId,
    references: input.references,
    // Check standards are measured exactly like vials, through the same correction.
    vials: [...input.vials.map((v) => v.region), ...checks.map((c) => c.region)],
    maxPixels: photoLimits().maxPixels,
  });
  const result = { ...measured, vials: measured.vials.slice(0, input.vials.length) };
  const checkResults = measured.vials.slice(input.vials.length);
  const badCheck = checkResults.findIndex((r) => !r.ok);
  if (badCheck >= 0) throw new AppError("invalid_input", `Check standard ${badCheck + 1} cannot be measured: ${(checkResults[badCheck] as { error: string }).error}`);
  const failed = result.vials.map((v, i) => (v.ok ? null : { i, error: v.error })).filter((v) => v !== null);
  if (failed.length > 0) {
    throw new AppError(
      "invalid_input",
      `Vial ${failed[0].i + 1} cannot be measured: ${failed[0].error}`,
      Object.fromEntries(failed.map((f) => [`vials.${f.i}.region`, [f.error]])),
    );
  }
  const saved = saveMeasurements(handle, {
    actorId: user.id,
    photoId: photo.id,
    lightingProfileId: input.lightingProfileId,
    correction: result.stored,
    references: result.references.map((r) => ({ region: r.region, lab: r.lab, rawLinearRgb: r.rawLinearRgb, label: r.label })),
    vials: input.vials.map((v, i) => {
      const c = (result.vials[i] as Extract<(typeof result.vials)[number], { ok: true }>).colour;
      // The replicate check runs again here on the colour just measured, against what is accepted now.
      const earlier = earlierReplicates(handle, { dyeId: v.dyeId, condition: v });
      const verdict = checkReplicate(c.lab, earlier.map((e) => [e.l, e.a, e.b]), c.uncertainty?.uDeltaE00 ?? null);
      const flags = [...c.flags, ...replicateFlags(c.lab, verdict).filter((f) => !c.flags.includes(f))];
      return {
        region: v.region,
        dyeId: v.dyeId,
        solventId: v.solventId,
        acidBase: v.acidBase,
        ph: v.ph,
        concentrationUmolL: v.concentrationUmolL,
        additive: v.additive,
        additiveConcentrationMolL: v.additiveConcentrationMolL,
        temperatureC: v.temperatureC,
        pathLengthMm: v.pathLengthMm,
        secondSolventId: v.secondSolventId,
        secondSolventMoleFraction: v.secondSolventMoleFraction,
        rawLinearRgb: c.rawLinearRgb,
        xyz: c.xyz,
        lab: c.lab,
        pixels: c.pixels,
        rejected: c.rejected,
        spread: c.spread,
        flags,
        flagReason: v.flagReason || null,
        uncertainty: c.uncertainty,
      };
    }),
    checks: checks.map((c, i) => ({ standardId: c.standardId, labD65: (checkResults[i] as Extract<(typeof checkResults)[number], { ok: true }>).colour.lab })),
    drift: { references: result.references, limit: DRIFT_LIMIT_DE00 },
  });
  const mailProblem = await mailDrift(photo.id, input.lightingProfileId, saved.driftFlagged);
  revalidatePath("/bench");
  revalidatePath(`/bench/photos/${photo.id}`);
  revalidatePath("/review");
  const { ids } = saved;
  const checkWords = saved.checks.map((c, i) => `${checkNames[i]} ΔE00 ${c.deltaE00.toFixed(2)} to its known value`);
  const where = input.lightingProfileId ? "in the profile's check history" : "with no profile (reference scaling only), so in no profile's check history";
  const message =
    ids.length === 0
      ? `Check reading${checkWords.length === 1 ? "" : "s"} saved, no measurements (only check standards were marked). Recorded ${where}: ${checkWords.join("; ")}.`
      : `Saved ${ids.length} measurement${ids.length === 1 ? "; it waits" : "s; they wait"} for review by another chemist or an admin.` + (checkWords.length ? ` Recorded ${where}: ${checkWords.join("; ")}.` : "");
  return { ok: true, message: message + mailProblem, data: { ids, checks: saved.checks } };
});

export const saveTemplateAction = formAction({ access: BENCH_ROLES, schema: jsonPayload }, async ({ payload }, { user }) => {
  const input = parseInput(templateSchema, parseJson(payload));
  const id = saveRackTemplate(db(), { actorId: user.id, actorRole: user.role, name: input.name, regions: input.regions });
  revalidatePath("/bench", "layout");
  return { ok: true, message: `Layout “${input.name}” saved with ${input.regions.length} regions.`, data: { id } };
});

export const deleteTemplateAction = formAction({ access: BENCH_ROLES, schema: z.object({ id: z.string().min(1).max(100) }) }, async ({ id }, { user }) => {
  deleteRackTemplate(db(), { actorId: user.id, actorRole: user.role, id });
  revalidatePath("/bench", "layout");
  return { ok: true, message: "Layout deleted." };
});

export const savePanelAction = formAction({ access: BENCH_ROLES, schema: jsonPayload }, async ({ payload }, { user }) => {
  const input = parseInput(panelSchema, parseJson(payload));
  const id = saveSolventPanel(db(), { actorId: user.id, actorRole: user.role, name: input.name, entries: input.entries });
  revalidatePath("/bench", "layout");
  return { ok: true, message: `Panel “${input.name}” saved with ${input.entries.length} solvent${input.entries.length === 1 ? "" : "s"}.`, data: { id } };
});

export const deletePanelAction = formAction({ access: BENCH_ROLES, schema: z.object({ id: z.string().min(1, { error: "Choose a panel first." }).max(100) }) }, async ({ id }, { user }) => {
  deleteSolventPanel(db(), { actorId: user.id, actorRole: user.role, id });
  revalidatePath("/bench", "layout");
  return { ok: true, message: "Panel deleted." };
});
