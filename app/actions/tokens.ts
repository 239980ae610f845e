"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { formAction } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { createApiToken, revokeApiToken } from "@/lib/auth/service";
import { tokenNameSchema } from "@/lib/validation/schemas";

export const createTokenAction = formAction({ access: ANY_ROLE, schema: tokenNameSchema }, async ({ name }, { user }) => {
  const { token } = createApiToken(db(), { userId: user.id, name, actorId: user.id });
  revalidatePath("/account");
  return { ok: true, message: "Token created. Copy it now: it is shown only once.", data: { token } };
});

export const revokeTokenAction = formAction({ access: ANY_ROLE, schema: z.object({ tokenId: z.string().min(1).max(100) }) }, async ({ tokenId }, { user }) => {
  revokeApiToken(db(), { tokenId, userId: user.id, actorId: user.id });
  revalidatePath("/account");
  return { ok: true, message: "Token revoked." };
});
