"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { setUserActive, setUserRole } from "@/db/queries/users";
import { formAction } from "@/lib/auth/guard";
import { ADMIN_ONLY, ROLE_LABELS } from "@/lib/auth/roles";
import { createInvitation, invalidateAllSessions, INVITATION_TTL_MS } from "@/lib/auth/service";
import { appUrl } from "@/lib/config/env";
import { AppError } from "@/lib/errors";
import { send, usingLocalMailbox } from "@/lib/mail";
import { inviteSchema, roleSchema } from "@/lib/validation/schemas";

export const inviteAction = formAction({ access: ADMIN_ONLY, schema: inviteSchema }, async (input, { user }) => {
  const { secret } = createInvitation(db(), { ...input, invitedBy: user.id });
  const days = Math.round(INVITATION_TTL_MS / 86_400_000);
  await send({
    to: input.email,
    subject: `${user.name} invited you to Solvatlas`,
    text: `Hello ${input.name},\n\n${user.name} has invited you to Solvatlas as a ${ROLE_LABELS[input.role].toLowerCase()}.\nOpen this link within ${days} days to choose your password:\n\n${appUrl()}/invite/${secret}\n\nThe link works once.\n`,
  });
  revalidatePath("/people");
  return {
    ok: true,
    message: usingLocalMailbox()
      ? `Invitation for ${input.email} written to the local mailbox (no SMTP server is configured).`
      : `Invitation sent to ${input.email}.`,
  };
});

const userIdSchema = z.string().min(1).max(100);

export const setRoleAction = formAction({ access: ADMIN_ONLY, schema: z.object({ userId: userIdSchema, role: roleSchema }) }, async (input, { user }) => {
  if (input.userId === user.id && input.role !== "admin") {
    throw new AppError("invalid_input", "You cannot remove your own admin role; ask another admin to do it.");
  }
  setUserRole(db(), { actorId: user.id, userId: input.userId, role: input.role });
  revalidatePath("/people");
  return { ok: true, message: "Role changed." };
});

export const setActiveAction = formAction(
  { access: ADMIN_ONLY, schema: z.object({ userId: userIdSchema, active: z.enum(["true", "false"]).transform((v) => v === "true") }) },
  async (input, { user }) => {
    if (input.userId === user.id) throw new AppError("invalid_input", "You cannot deactivate your own account.");
    setUserActive(db(), { actorId: user.id, userId: input.userId, active: input.active });
    if (!input.active) await invalidateAllSessions(db(), input.userId);
    revalidatePath("/people");
    return {
      ok: true,
      message: input.active ? "Account reactivated. API tokens revoked at deactivation stay revoked; the person makes new ones." : "Account deactivated; its sessions have ended and its API tokens are revoked.",
    };
  },
);
