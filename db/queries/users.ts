import { and, desc, eq, gt, isNull, sql } from "drizzle-orm";
import type { Db } from "../connection";
import { apiTokens, invitations, passwordResets, signInAttempts, users, type Role, type User } from "../schema";
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

export function setUserRole(db: Db, { actorId, userId, role }: { actorId: string; userId: string; role: Role }) {
  db.transaction((tx) => {
    const before = tx.select().from(users).where(eq(users.id, userId)).get();
    if (!before) return;
    tx.update(users).set({ role }).where(eq(users.id, userId)).run();
    recordAudit(tx, { actorId, action: "user.role", entity: "user", entityId: userId, before: { role: before.role }, after: { role } });
  });
}

export function setUserActive(db: Db, { actorId, userId, active }: { actorId: string; userId: string; active: boolean }) {
  db.transaction((tx) => {
    const before = tx.select().from(users).where(eq(users.id, userId)).get();
    if (!before) return;
    const deactivatedAt = active ? null : new Date();
    tx.update(users).set({ deactivatedAt }).where(eq(users.id, userId)).run();
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

export function countRecentFailures(db: Db, { email, ip, since }: { email: string; ip: string; since: Date }) {
  const byEmail = db
    .select({ n: sql<number>`count(*)` })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.email, normalizeEmail(email)), eq(signInAttempts.succeeded, false), gt(signInAttempts.at, since)))
    .get();
  const byIp = db
    .select({ n: sql<number>`count(*)` })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.ip, ip), eq(signInAttempts.succeeded, false), gt(signInAttempts.at, since)))
    .get();
  return { email: byEmail?.n ?? 0, ip: byIp?.n ?? 0 };
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

function activeTokenQuery(db: Db) {
  return db
    .select({ token: apiTokens, user: users })
    .from(apiTokens)
    .innerJoin(users, eq(apiTokens.userId, users.id))
    .where(and(eq(apiTokens.tokenHash, sql.placeholder("tokenHash")), isNull(apiTokens.revokedAt)))
    .prepare();
}

// Every token-authenticated API call runs this lookup: prepared once per database handle, since
// building the query each time cost more than running it (bench:load).
const activeTokenQueries = new WeakMap<Db["$client"], ReturnType<typeof activeTokenQuery>>();

export function findActiveToken(db: Db, { tokenHash }: { tokenHash: string }) {
  // Inside a transaction there is no $client to key the cache on: prepare for this call only.
  if (!db.$client) return activeTokenQuery(db).get({ tokenHash });
  let query = activeTokenQueries.get(db.$client);
  if (!query) activeTokenQueries.set(db.$client, (query = activeTokenQuery(db)));
  return query.get({ tokenHash });
}
