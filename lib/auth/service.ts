/**
 * Sign-in, invitations, password resets and API tokens. Every function takes the database handle,
 * so the app, the CLI and tests share one implementation.
 */
import { and, eq, isNull } from "drizzle-orm";
import type { Db } from "@/db/connection";
import { recordAudit } from "@/db/queries/audit";
import {
  findActiveToken,
  findInvitationByHash,
  findResetByHash,
  findUserByEmail,
  findUserById,
  normalizeEmail,
  recentFailures,
  revokeAllApiTokens,
  recordSignInAttempt,
  toPublicUser,
  type PublicUser,
} from "@/db/queries/users";
import { apiTokens, invitations, passwordResets, users, type Role } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { luciaFor } from "./lucia";
import { dummyPasswordHash, hashPassword, verifyPassword } from "./password";
import { ACCOUNT_POLICY, ADDRESS_POLICY, remainingWait, THROTTLE_WINDOW_MS } from "./throttle";
import { newApiToken, newId, newSecret, sha256Hex } from "./tokens";

export { THROTTLE_WINDOW_MS };
export const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000;
export const RESET_TTL_MS = 60 * 60 * 1000;

export type AuthUser = PublicUser;

function isActive(user: { deactivatedAt: Date | number | null }): boolean {
  return user.deactivatedAt === null;
}

/**
 * Checks the password and opens a session. Repeated failures slow further attempts down, per account
 * and per client address (lib/auth/throttle.ts); an attempt that comes too early is refused without
 * looking at the password, and once the wait is over the right password works again.
 */
export async function signInWithPassword(
  db: Db,
  { email, password, ip }: { email: string; password: string; ip: string },
): Promise<{ user: AuthUser; sessionId: string; expiresAt: Date }> {
  const now = Date.now();
  const failures = recentFailures(db, { email, ip, since: new Date(now - THROTTLE_WINDOW_MS) });
  const waitMs = Math.max(remainingWait(failures.account, ACCOUNT_POLICY, now), remainingWait(failures.address, ADDRESS_POLICY, now));
  if (waitMs > 0) {
    const seconds = Math.ceil(waitMs / 1000);
    console.warn(
      JSON.stringify({ event: "sign-in.throttled", email: normalizeEmail(email), ip, accountFailures: failures.account.count, addressFailures: failures.address.count, waitSeconds: seconds }),
    );
    throw new AppError(
      "rate_limited",
      `Too many failed sign-ins. Wait ${seconds} second${seconds === 1 ? "" : "s"} and try again, or use "Forgot your password?" to get a reset link.`,
    );
  }
  const user = findUserByEmail(db, { email });
  const ok = user?.passwordHash
    ? await verifyPassword(user.passwordHash, password)
    : (await verifyPassword(await dummyPasswordHash(), password), false);
  if (!user || !ok) {
    recordSignInAttempt(db, { email, ip, succeeded: false });
    console.warn(JSON.stringify({ event: "sign-in.failed", email: normalizeEmail(email), ip }));
    throw new AppError("unauthenticated", "That e-mail and password do not match. Check both and try again.");
  }
  if (!isActive(user)) {
    recordSignInAttempt(db, { email, ip, succeeded: false });
    throw new AppError("forbidden", "This account has been deactivated. Ask an admin of your lab if you need it back.");
  }
  recordSignInAttempt(db, { email, ip, succeeded: true });
  const session = await luciaFor(db).createSession(user.id, {});
  return { user: toPublicUser(user), sessionId: session.id, expiresAt: session.expiresAt };
}

export async function validateSessionId(
  db: Db,
  sessionId: string,
): Promise<{ user: AuthUser; sessionId: string; expiresAt: Date; fresh: boolean } | null> {
  const { session, user } = await luciaFor(db).validateSession(sessionId);
  if (!session || !user) return null;
  const full = findUserById(db, { id: user.id });
  if (!full || !isActive(full)) {
    await luciaFor(db).invalidateUserSessions(user.id);
    return null;
  }
  return { user: toPublicUser(full), sessionId: session.id, expiresAt: session.expiresAt, fresh: session.fresh };
}

export async function signOutSession(db: Db, sessionId: string): Promise<void> {
  await luciaFor(db).invalidateSession(sessionId);
}

export async function invalidateAllSessions(db: Db, userId: string): Promise<void> {
  await luciaFor(db).invalidateUserSessions(userId);
}

// ---------------------------------------------------------------- API tokens

export function authenticateApiToken(db: Db, token: string): AuthUser | null {
  const found = findActiveToken(db, { tokenHash: sha256Hex(token) });
  if (!found) return null;
  if (found.token.expiresAt && found.token.expiresAt.getTime() <= Date.now()) return null;
  if (!isActive(found.user)) return null;
  db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, found.token.id)).run();
  return toPublicUser(found.user);
}

export function createApiToken(
  db: Db,
  { userId, name, actorId, expiresAt }: { userId: string; name: string; actorId: string | null; expiresAt?: Date | null },
): { id: string; token: string; prefix: string } {
  const user = findUserById(db, { id: userId });
  if (!user) throw new AppError("not_found", "No such user.");
  if (!isActive(user)) throw new AppError("forbidden", "This account is deactivated; it cannot hold API tokens.");
  const { token, prefix, hash } = newApiToken();
  const id = newId("tok");
  db.transaction((tx) => {
    tx.insert(apiTokens).values({ id, userId, name, prefix, tokenHash: hash, expiresAt: expiresAt ?? null }).run();
    recordAudit(tx, { actorId, action: "token.create", entity: "api_token", entityId: id, after: { userId, name, prefix } });
  });
  return { id, token, prefix };
}

export function revokeApiToken(db: Db, { tokenId, userId, actorId }: { tokenId: string; userId: string; actorId: string }) {
  const row = db.select().from(apiTokens).where(and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, userId))).get();
  if (!row) throw new AppError("not_found", "That token does not exist or is not yours.");
  if (row.revokedAt) return;
  db.transaction((tx) => {
    const revokedAt = new Date();
    tx.update(apiTokens).set({ revokedAt }).where(eq(apiTokens.id, tokenId)).run();
    recordAudit(tx, { actorId, action: "token.revoke", entity: "api_token", entityId: tokenId, before: { revokedAt: null }, after: { revokedAt } });
  });
}

// ---------------------------------------------------------------- invitations

export function createInvitation(
  db: Db,
  { email, name, role, invitedBy }: { email: string; name: string; role: Role; invitedBy: string },
): { id: string; secret: string } {
  const normalized = normalizeEmail(email);
  if (findUserByEmail(db, { email: normalized })) {
    throw new AppError("conflict", `${normalized} already has an account. Change its role on the people page instead.`, {
      email: ["already has an account"],
    });
  }
  const secret = newSecret();
  const id = newId("inv");
  db.transaction((tx) => {
    // A new invitation replaces any earlier one still open for the same address.
    tx.update(invitations)
      .set({ usedAt: new Date() })
      .where(and(eq(invitations.email, normalized), isNull(invitations.usedAt)))
      .run();
    tx.insert(invitations)
      .values({ id, email: normalized, name, role, tokenHash: sha256Hex(secret), invitedBy, expiresAt: new Date(Date.now() + INVITATION_TTL_MS) })
      .run();
    recordAudit(tx, { actorId: invitedBy, action: "invitation.create", entity: "invitation", entityId: id, after: { email: normalized, role } });
  });
  return { id, secret };
}

/** The invitation behind a link, if it can still be used. */
export function openInvitation(db: Db, secret: string) {
  const inv = findInvitationByHash(db, { tokenHash: sha256Hex(secret) });
  if (!inv || inv.usedAt || inv.expiresAt.getTime() <= Date.now()) return null;
  return inv;
}

export async function acceptInvitation(db: Db, { secret, password }: { secret: string; password: string }): Promise<AuthUser> {
  const inv = openInvitation(db, secret);
  if (!inv) {
    throw new AppError("invalid_input", "This invitation link has expired or was already used. Ask your admin for a new one.");
  }
  const passwordHash = await hashPassword(password);
  const userId = newId("usr");
  db.transaction((tx) => {
    // Mark used first, conditionally, so two simultaneous submissions cannot both succeed.
    const claimed = tx
      .update(invitations)
      .set({ usedAt: new Date() })
      .where(and(eq(invitations.id, inv.id), isNull(invitations.usedAt)))
      .run();
    if (claimed.changes !== 1) throw new AppError("invalid_input", "This invitation link was already used.");
    if (tx.select().from(users).where(eq(users.email, inv.email)).get()) {
      throw new AppError("conflict", `${inv.email} already has an account; sign in or reset the password.`);
    }
    tx.insert(users).values({ id: userId, email: inv.email, name: inv.name, role: inv.role, passwordHash }).run();
    recordAudit(tx, { actorId: userId, action: "invitation.accept", entity: "user", entityId: userId, after: { email: inv.email, role: inv.role } });
  });
  return toPublicUser(findUserById(db, { id: userId })!);
}

// ---------------------------------------------------------------- password resets

/** Creates a reset for an active account; returns null (and does nothing) for unknown or inactive ones. */
export function createPasswordReset(db: Db, { email }: { email: string }): { secret: string; user: AuthUser } | null {
  const user = findUserByEmail(db, { email });
  if (!user || !isActive(user)) return null;
  const secret = newSecret();
  db.insert(passwordResets)
    .values({ id: newId("rst"), userId: user.id, tokenHash: sha256Hex(secret), expiresAt: new Date(Date.now() + RESET_TTL_MS) })
    .run();
  return { secret, user: toPublicUser(user) };
}

export function openPasswordReset(db: Db, secret: string) {
  const reset = findResetByHash(db, { tokenHash: sha256Hex(secret) });
  if (!reset || reset.usedAt || reset.expiresAt.getTime() <= Date.now()) return null;
  return reset;
}

export async function completePasswordReset(db: Db, { secret, password }: { secret: string; password: string }): Promise<AuthUser> {
  const reset = openPasswordReset(db, secret);
  if (!reset) throw new AppError("invalid_input", "This reset link has expired or was already used. Ask for a new one.");
  const passwordHash = await hashPassword(password);
  db.transaction((tx) => {
    const claimed = tx
      .update(passwordResets)
      .set({ usedAt: new Date() })
      .where(and(eq(passwordResets.id, reset.id), isNull(passwordResets.usedAt)))
      .run();
    if (claimed.changes !== 1) throw new AppError("invalid_input", "This reset link was already used.");
    tx.update(users).set({ passwordHash }).where(eq(users.id, reset.userId)).run();
    recordAudit(tx, { actorId: reset.userId, action: "user.password-reset", entity: "user", entityId: reset.userId });
    // A reset is the way back in after losing control of the account: tokens made before it go too.
    revokeAllApiTokens(tx, { actorId: reset.userId, userId: reset.userId, reason: "password reset" });
  });
  await invalidateAllSessions(db, reset.userId);
  return toPublicUser(findUserById(db, { id: reset.userId })!);
}

/**
 * Changes a signed-in person's password after checking the current one; ends their other sessions.
 * API tokens are kept (the person proved the current password, and lab scripts keep running); they are
 * listed on the account page to revoke one by one. A password reset, by contrast, revokes them all.
 */
export async function changePassword(
  db: Db,
  { userId, currentPassword, newPassword, keepSessionId }: { userId: string; currentPassword: string; newPassword: string; keepSessionId: string | null },
): Promise<void> {
  const user = findUserById(db, { id: userId });
  if (!user?.passwordHash || !(await verifyPassword(user.passwordHash, currentPassword))) {
    throw new AppError("invalid_input", "Your current password is not right; nothing was changed.", { currentPassword: ["not right"] });
  }
  const passwordHash = await hashPassword(newPassword);
  db.transaction((tx) => {
    tx.update(users).set({ passwordHash }).where(eq(users.id, userId)).run();
    recordAudit(tx, { actorId: userId, action: "user.password-change", entity: "user", entityId: userId });
  });
  for (const session of await luciaFor(db).getUserSessions(userId)) {
    if (session.id !== keepSessionId) await luciaFor(db).invalidateSession(session.id);
  }
}
