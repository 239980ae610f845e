"use server";

import { revalidatePath } from "next/cache";
import { db } from "@/db/client";
import { redirect } from "next/navigation";
import { z } from "zod";
import { addSolvent, updateSolvent } from "@/db/queries/solvents";
import { formAction, parseInput } from "@/lib/auth/guard";
import { ADMIN_ONLY } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { etnFromEt30 } from "@/lib/solvents/parameters";
import { solventEditSchema } from "@/lib/validation/solvent";

/** The stored columns of a checked solvent form (each value beside its source; ETN derived from ET(30)). */
function solventColumns(input: z.infer<typeof solventEditSchema>) {
  return {
    medium: input.medium,
    mediumSource: input.mediumSource,
    cautions: input.cautions,
    et30: input.et30.value,
    et30Source: input.et30.source,
    etn: input.et30.value === null ? null : etnFromEt30(input.et30.value),
    ktAlpha: input.alpha.value,
    ktAlphaSource: input.alpha.source,
    ktBeta: input.beta.value,
    ktBetaSource: input.beta.source,
    ktPiStar: input.piStar.value,
    ktPiStarSource: input.piStar.source,
    permittivity: input.permittivity.value,
    permittivitySource: input.permittivity.source,
  };
}

export const updateSolventAction = formAction({ access: ADMIN_ONLY, schema: solventEditSchema }, async (input, { user }) => {
  const after = updateSolvent(db(), {
    actorId: user.id,
    id: input.id,
    changes: solventColumns(input),
  });
  if (!after) throw new AppError("not_found", "This solvent no longer exists.");
  revalidatePath("/solvents");
  return { ok: true, message: `${after.name} saved; the change is in the audit log.` };
});

const solventNewSchema = z.looseObject({
  name: z.string().trim().min(1, { error: "Give the solvent's name, e.g. 2-Methoxyethanol." }).max(120),
  synonyms: z
    .string()
    .max(2000)
    .default("")
    .transform((v) => v.split(/[,;\n]/).map((s) => s.trim()).filter(Boolean)),
});

/** Adds a solvent (admins): every parameter given needs its source, as when editing one. */
export const createSolventAction = formAction({ access: ADMIN_ONLY, schema: solventNewSchema }, async (raw, { user }) => {
  const input = parseInput(solventEditSchema, { ...raw, id: "new" });
  const after = addSolvent(db(), {
    actorId: user.id,
    solvent: {
      name: raw.name,
      synonyms: raw.synonyms,
      ...solventColumns(input),
    },
  });
  revalidatePath("/solvents");
  redirect(`/solvents/${after.id}`);
});
