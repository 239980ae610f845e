"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { updateDye } from "@/db/queries/dyes";
import { formAction } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { dyeEditSchema } from "@/lib/validation/schemas";

export const updateDyeAction = formAction({ access: BENCH_ROLES, schema: dyeEditSchema.extend({ id: z.string().min(1).max(100) }) }, async ({ id, ...changes }, { user }) => {
  const after = updateDye(db(), { actorId: user.id, id, changes });
  if (!after) throw new AppError("not_found", "This dye no longer exists.");
  revalidatePath(`/catalogue/${after.code}`);
  revalidatePath("/catalogue");
  return { ok: true, message: "Saved." };
});
