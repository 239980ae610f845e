"use server";

import { redirect } from "next/navigation";
import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import {
  applyRederive,
  approveProfile,
  createCheckStandard,
  createDraftProfile,
  createTarget,
  fitProfileFromPhoto,
  reopenProfile,
  retireCheckStandard,
  retireProfile,
  updateCheckStandard,
  updateDraftProfile,
  updateTarget,
} from "@/db/queries/lighting";
import { formAction, parseInput } from "@/lib/auth/guard";
import { ADMIN_ONLY } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { approveSchema, checkStandardEditSchema, checkStandardIdSchema, checkStandardSchema, fitRequestSchema, profileFormSchema, profileIdSchema, rederiveSchema, targetFormSchema } from "@/lib/lighting/schemas";
import { parseTargetCsv } from "@/lib/lighting/target-csv";
import { objectStore } from "@/lib/storage";
import { photoLimits } from "@/lib/storage/limits";

function refresh(id?: string) {
  revalidatePath("/lighting");
  if (id) revalidatePath(`/lighting/profiles/${id}`);
  revalidatePath("/bench", "layout");
}

/** Creates a draft profile, or edits one (only drafts can be edited). Admins only; audited. */
export const saveProfileAction = formAction({ access: ADMIN_ONLY, schema: profileFormSchema }, async (input, { user }) => {
  const { id, validFrom, ...rest } = input;
  if (!validFrom) throw new AppError("invalid_input", "Give the date the profile is valid from.", { validFrom: ["Give a date."] });
  const fields = { ...rest, validFrom };
  if (id) {
    updateDraftProfile(db(), { actorId: user.id, id, fields });
    refresh(id);
    return { ok: true, message: `Draft “${fields.name}” saved.`, data: { id } };
  }
  const newId = createDraftProfile(db(), { actorId: user.id, fields });
  refresh(newId);
  // Straight to the new draft: fitting it from a card photo is the next step, and a redirect does not
  // depend on the list page keeping the form's state while it re-renders.
  redirect(`/lighting/profiles/${newId}?created=1`);
});

export const approveProfileAction = formAction({ access: ADMIN_ONLY, schema: approveSchema }, async ({ id, toleranceMean, toleranceMax }, { user }) => {
  approveProfile(db(), { actorId: user.id, id, tolerance: { meanDeltaE00: toleranceMean, maxDeltaE00: toleranceMax } });
  refresh(id);
  return { ok: true, message: "Profile approved; chemists can now pick it on the bench." };
});

export const retireProfileAction = formAction({ access: ADMIN_ONLY, schema: profileIdSchema }, async ({ id }, { user }) => {
  retireProfile(db(), { actorId: user.id, id });
  refresh(id);
  return { ok: true, message: "Profile retired; it can no longer be chosen on the bench. Its measurements keep naming it." };
});

export const reopenProfileAction = formAction({ access: ADMIN_ONLY, schema: profileIdSchema }, async ({ id }, { user }) => {
  reopenProfile(db(), { actorId: user.id, id });
  refresh(id);
  return { ok: true, message: "Profile reopened as a draft for a re-fit; approve it again, then re-derive its measurements." };
});

const payload = z.object({ payload: z.string().min(2).max(100_000) });

/** Samples the card on the stored photo through the placed grid, fits, and stores the fit in the draft. */
export const fitProfileAction = formAction({ access: ADMIN_ONLY, schema: payload }, async ({ payload: text }, { user }) => {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    throw new AppError("invalid_input", "The grid could not be read; reload the page and place it again.");
  }
  const input = parseInput(fitRequestSchema, raw);
  const { fit } = await fitProfileFromPhoto(db(), objectStore(), { actorId: user.id, profileId: input.profileId, photoId: input.photoId, corners: input.corners, maxPixels: photoLimits().maxPixels });
  refresh(input.profileId);
  return {
    ok: true,
    message: `Fitted with ${fit.method}: leave-one-out ΔE00 mean ${fit.looMean.toFixed(2)}, worst ${fit.looMax.toFixed(2)}.`,
    data: { method: fit.method, looMean: fit.looMean, looMax: fit.looMax },
  };
});

/** Creates or edits a calibration target; the patch list comes from CSV (name, L*, a*, b*, white point). */
export const saveTargetAction = formAction({ access: ADMIN_ONLY, schema: targetFormSchema }, async (input, { user }) => {
  const parsed = parseTargetCsv(input.csv);
  if (!parsed.ok) throw new AppError("invalid_input", parsed.errors.join(" "), { csv: parsed.errors });
  if (parsed.whitePoint !== input.whitePoint) {
    throw new AppError("invalid_input", `The patch list is given under ${parsed.whitePoint} but the target says ${input.whitePoint}; make the two agree.`, { whitePoint: ["Must match the CSV."] });
  }
  const fields = {
    name: input.name,
    description: input.description,
    source: input.source,
    whitePoint: input.whitePoint,
    gridRows: input.gridRows,
    gridColumns: input.gridColumns,
    patches: parsed.patches,
  };
  if (input.id) {
    updateTarget(db(), { actorId: user.id, id: input.id, fields });
    refresh();
    return { ok: true, message: `Target “${input.name}” saved with ${parsed.patches.length} patches.`, data: { id: input.id } };
  }
  const id = createTarget(db(), { actorId: user.id, fields });
  refresh();
  return { ok: true, message: `Target “${input.name}” created with ${parsed.patches.length} patches.`, data: { id } };
});

const standardFields = (input: z.infer<typeof checkStandardSchema>) => ({
  name: input.name,
  kind: input.kind,
  lab: [input.l!, input.a!, input.b!] as [number, number, number],
  whitePoint: input.whitePoint,
  sourceInstrument: input.sourceInstrument,
  notes: input.notes,
});

export const createCheckStandardAction = formAction({ access: ADMIN_ONLY, schema: checkStandardSchema }, async (input, { user }) => {
  createCheckStandard(db(), { actorId: user.id, fields: standardFields(input) });
  refresh();
  return { ok: true, message: `Check standard “${input.name}” registered.` };
});

/** Edits a check standard; its known value is refused once readings were computed against it (db/queries/lighting.ts). Admins only; audited. */
export const updateCheckStandardAction = formAction({ access: ADMIN_ONLY, schema: checkStandardEditSchema }, async ({ id, ...input }, { user }) => {
  updateCheckStandard(db(), { actorId: user.id, id, fields: standardFields(input) });
  refresh();
  revalidatePath("/lighting/profiles", "layout");
  return { ok: true, message: `Check standard “${input.name}” saved.` };
});

/** Retires a check standard: no longer offered on the bench, its readings stay in the check histories. Admins only; audited. */
export const retireCheckStandardAction = formAction({ access: ADMIN_ONLY, schema: checkStandardIdSchema }, async ({ id }, { user }) => {
  retireCheckStandard(db(), { actorId: user.id, id });
  refresh();
  revalidatePath("/lighting/profiles", "layout");
  return { ok: true, message: "Check standard retired; it is no longer offered on the bench. Its readings stay in the profiles' check histories." };
});

/** Re-derives every measurement under a profile after the admin saw the preview (count must match). */
export const rederiveAction = formAction({ access: ADMIN_ONLY, schema: rederiveSchema }, async ({ id, expected }, { user }) => {
  const { changed } = applyRederive(db(), { actorId: user.id, profileId: id, expected });
  refresh(id);
  revalidatePath("/measurements");
  return { ok: true, message: `${changed} measurement${changed === 1 ? "" : "s"} re-derived; the old values are in the audit log.` };
});
