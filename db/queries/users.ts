import { and, desc, eq, gt, isNull, sql } from "drizzle-orm";
import type { Db } from "../connection";
import { apiTokens, invitations, passwordResets, signInAttempts, users, type Role, type User } from "../schema";
import { AppError } from "../../lib/errors";
import { recordAudit } from "./audit";

/** What may leave the database about a person (never the password hash). */
export type PublicUser = Pick<User, "id" | "email" | "name" | "role" | "deactivatedAt" | "createdAt">;

export function toPublicUser(u: User): PublicUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role, deactivatedAt: u.deactivatedAt, createdAt: u.createdAt };
}

export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}

export function findUserByEmail(db: Db, { email }: { email: string }): User | undefined {
  return db.select().from(users).where(eq(users.email, normalizeEmail(email))).get();
}

export function findUserById(db: Db, { id }: { id: string }): User | undefined {
  return db.select().from(users).where(eq(users.id, id)).get();
}

export function listUsers(db: Db): PublicUser[] {
  return db.select().from(users).orderBy(users.name).all().map(toPublicUser);
}

const NO_SUCH_PERSON = "This person's account no longer exists; reload the people page.";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/**
 * Revokes every live API token of a person, with one audit entry. Revoked is final: reactivating the
 * account later does not bring the tokens back.
 */
export function revokeAllApiTokens(tx: Db | Tx, { actorId, userId, reason }: { actorId: string | null; userId: string; reason: string }): number {
  const revokedAt = new Date();
  const { changes } = tx.update(apiTokens).set({ revokedAt }).where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt))).run();
  if (changes > 0) recordAudit(tx, { actorId, action: "token.revoke-all", entity: "user", entityId: userId, after: { revoked: changes, reason } });
  return changes;
}

/** Throws not_found (and changes nothing) when there is no such person. */
export function setUserRole(db: Db, { actorId, userId, role }: { actorId: string; userId: string; role: Role }) {
  db.transaction((tx) => {
    const before = tx.select().from(users).where(eq(users.id, userId)).get();
    if (!before) throw new AppError("not_found", NO_SUCH_PERSON);
    tx.update(users).set({ role }).where(eq(users.id, userId)).run();
    recordAudit(tx, { actorId, action: "user.role", entity: "user", entityId: userId, before: { role: before.role }, after: { role } });
  });
}

/** Deactivating also revokes the person's API tokens for good. Throws not_found for an unknown person. */
export function setUserActive(db: Db, { actorId, userId, active }: { actorId: string; userId: string; active: boolean }) {
  db.transaction((tx) => {
    const before = tx.select().from(users).where(eq(users.id, userId)).get();
    if (!before) throw new AppError("not_found", NO_SUCH_PERSON);
    const deactivatedAt = active ? null : new Date();
    tx.update(users).set({ deactivatedAt }).where(eq(users.id, userId)).run();
    if (!active) revokeAllApiTokens(tx, { actorId, userId, reason: "deactivated" });
    recordAudit(tx, {
      actorId,
      action: active ? "user.reactivate" : "user.deactivate",
      entity: "user",
      entityId: userId,
      before: { deactivatedAt: before.deactivatedAt },
      after: { deactivatedAt },
    });
  });
}

// ---------------------------------------------------------------- sign-in throttling

export function recordSignInAttempt(db: Db, a: { email: string; ip: string; succeeded: boolean }) {
  db.insert(signInAttempts).values({ ...a, email: normalizeEmail(a.email), at: new Date() }).run();
}

/**
 * Recent failed sign-ins for an account (only those after its last successful sign-in) and for a
 * client address, each with the time of the latest one.
 */
export function recentFailures(db: Db, { email, ip, since }: { email: string; ip: string; since: Date }) {
  const address = normalizeEmail(email);
  const lastSuccess = db
    .select({ at: sql<number | null>`max(${signInAttempts.at})` })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.email, address), eq(signInAttempts.succeeded, true), gt(signInAttempts.at, since)))
    .get()?.at;
  const accountSince = lastSuccess && lastSuccess > since.getTime() ? new Date(lastSuccess) : since;
  const summary = (where: ReturnType<typeof and>) => {
    const row = db
      .select({ n: sql<number>`count(*)`, last: sql<number | null>`max(${signInAttempts.at})` })
      .from(signInAttempts)
      .where(where)
      .get();
    return { count: row?.n ?? 0, lastAt: row?.last ? new Date(row.last) : null };
  };
  return {
    account: summary(and(eq(signInAttempts.email, address), eq(signInAttempts.succeeded, false), gt(signInAttempts.at, accountSince))),
    address: summary(and(eq(signInAttempts.ip, ip), eq(signInAttempts.succeeded, false), gt(signInAttempts.at, since))),
  };
}

// ---------------------------------------------------------------- invitations and resets

export function listInvitations(db: Db) {
  return db.select().from(invitations).orderBy(desc(invitations.createdAt)).limit(100).all();
}

export function findInvitationByHash(db: Db, { tokenHash }: { tokenHash: string }) {
  return db.select().from(invitations).where(eq(invitations.tokenHash, tokenHash)).get();
}

export function findResetByHash(db: Db, { tokenHash }: { tokenHash: string }) {
  return db.select().from(passwordResets).where(eq(passwordResets.tokenHash, tokenHash)).get();
}

// ---------------------------------------------------------------- API tokens

export function listApiTokens(db: Db, { userId }: { userId: string }) {
  return db
    .select({
      id: apiTokens.id,
      name: apiTokens.name,
      prefix: apiTokens.prefix,
      createdAt: apiTokens.createdAt,
      lastUsedAt: apiTokens.lastUsedAt,
      expiresAt: apiTokens.expiresAt,
      revokedAt: apiTokens.revokedAt,
    })
    .from(apiTokens)
    .where(eq(apiTokens.userId, userId))
    .orderBy(desc(apiTokens.createdAt))
    .all();
}

export function findActiveToken(db: Db, { tokenHash }: { tokenHash: string }) {
  return db
    .select({ token: apiTokens, user: users })
    .from(apiTokens)
    .innerJoin(users, eq(apiTokens.userId, users.id))
    .where(and(eq(apiTokens.tokenHash, tokenHash), isNull(apiTokens.revokedAt)))
    .get();
}
