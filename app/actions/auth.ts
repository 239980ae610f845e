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
import { takeRateSlot } from "@/db/queries/rate";
import { appUrl } from "@/lib/config/env";
import { AppError } from "@/lib/errors";
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

/** Reset mails: per client address (visible refusal) and per account (silently no more mail). Common practice, no source. */
const RESETS_PER_ADDRESS_PER_HOUR = 10;
const RESETS_PER_ACCOUNT_PER_HOUR = 3;
const HOUR_MS = 3600 * 1000;

export const requestResetAction = formAction({ access: "public", schema: z.object({ email: emailSchema }) }, async ({ email }) => {
  const handle = db();
  const ip = await clientIp();
  if (!takeRateSlot(handle, { kind: "reset-by-address", key: ip, max: RESETS_PER_ADDRESS_PER_HOUR, windowMs: HOUR_MS })) {
    console.warn(JSON.stringify({ event: "password-reset.throttled", ip }));
    throw new AppError("rate_limited", "Too many reset requests from this network in the last hour. Wait an hour, or ask an admin of your lab for help.");
  }
  // Beyond the per-account allowance nothing is sent, with the same answer, so the form still does not reveal who has an account.
  const allowed = takeRateSlot(handle, { kind: "reset-by-account", key: email.trim().toLowerCase(), max: RESETS_PER_ACCOUNT_PER_HOUR, windowMs: HOUR_MS });
  const reset = allowed ? createPasswordReset(handle, { email }) : null;
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
