"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { redirect } from "next/navigation";
import { addDye, updateDye } from "@/db/queries/dyes";
import { formAction } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { dyeCreateFormSchema } from "@/lib/validation/dye";
import { dyeEditSchema } from "@/lib/validation/schemas";

export const updateDyeAction = formAction({ access: BENCH_ROLES, schema: dyeEditSchema.extend({ id: z.string().min(1).max(100) }) }, async ({ id, ...changes }, { user }) => {
  const after = updateDye(db(), { actorId: user.id, id, changes });
  if (!after) throw new AppError("not_found", "This dye no longer exists.");
  revalidatePath(`/catalogue/${after.code}`);
  revalidatePath("/catalogue");
  return { ok: true, message: "Saved." };
});

/** Adds a dye to the catalogue (chemists, admins), then opens its page. */
export const createDyeAction = formAction({ access: BENCH_ROLES, schema: dyeCreateFormSchema }, async (input, { user }) => {
  const dye = addDye(db(), { actorId: user.id, dye: input });
  revalidatePath("/catalogue");
  redirect(`/catalogue/${encodeURIComponent(dye.code)}?added=1`);
});
