"use server";

import { redirect } from "next/navigation";
import { z } from "zod";
import { db } from "@/db/client";
import { formAction } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import {
  acceptInvitation,
  changePassword,
  completePasswordReset,
  createPasswordReset,
  signInWithPassword,
  signOutSession,
} from "@/lib/auth/service";
import { clearSessionCookie, clientIp, sessionIdFromCookie, writeSessionCookie } from "@/lib/auth/session";
import { appUrl } from "@/lib/config/env";
import { send } from "@/lib/mail";
import { emailSchema, newPasswordSchema, passwordSchema, signInSchema } from "@/lib/validation/schemas";

export const signInAction = formAction({ access: "public", schema: signInSchema }, async (input) => {
  const { sessionId, expiresAt } = await signInWithPassword(db(), { email: input.email, password: input.password, ip: await clientIp() });
  await writeSessionCookie(sessionId, expiresAt);
  redirect(input.next);
});

export async function signOutAction(): Promise<void> {
  const sessionId = await sessionIdFromCookie();
  if (sessionId) await signOutSession(db(), sessionId);
  await clearSessionCookie();
  redirect("/sign-in");
}

export const requestResetAction = formAction({ access: "public", schema: z.object({ email: emailSchema }) }, async ({ email }) => {
  const reset = createPasswordReset(db(), { email });
  if (reset) {
    await send({
      to: reset.user.email,
      subject: "Reset your Solvatlas password",
      text: `Hello ${reset.user.name},\n\nSomeone (hopefully you) asked to reset the password of your Solvatlas account.\nOpen this link within one hour to choose a new one:\n\n${appUrl()}/reset/${reset.secret}\n\nIf you did not ask for this, ignore this message; your password stays as it is.\n`,
    });
  }
  // The same answer either way, so the form does not reveal who has an account.
  return { ok: true, message: "If that address has an active account, a reset link is on its way. It works for one hour." };
});

export const completeResetAction = formAction({ access: "public", schema: newPasswordSchema }, async ({ token, password }) => {
  await completePasswordReset(db(), { secret: token, password });
  redirect("/sign-in?reset=1");
});

export const acceptInvitationAction = formAction({ access: "public", schema: newPasswordSchema }, async ({ token, password }) => {
  const user = await acceptInvitation(db(), { secret: token, password });
  const { sessionId, expiresAt } = await signInWithPassword(db(), { email: user.email, password, ip: await clientIp() });
  await writeSessionCookie(sessionId, expiresAt);
  redirect("/");
});

const changePasswordSchema = z
  .object({ currentPassword: z.string().min(1, { error: "Enter your current password." }).max(200), password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { error: "The two passwords differ; type the same one twice.", path: ["confirm"] });

export const changePasswordAction = formAction({ access: ANY_ROLE, schema: changePasswordSchema }, async (input, { user }) => {
  await changePassword(db(), { userId: user.id, currentPassword: input.currentPassword, newPassword: input.password, keepSessionId: await sessionIdFromCookie() });
  return { ok: true, message: "Password changed. Other devices signed in with your account have been signed out." };
});
