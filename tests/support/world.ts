/**
 * A small lab in a fresh database for integration tests: the solvent table, one person per role,
 * a deactivated chemist, a dye, a condition and one pending measurement by the chemist.
 */
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { seedSolvents } from "@/db/seed/demo";
import { conditions, dyes, measurements, users, type Role } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import { createApiToken, revokeApiToken, signInWithPassword } from "@/lib/auth/service";
import { SESSION_COOKIE } from "@/lib/auth/lucia";
import { requestContext } from "./request-context";

export const PASSWORD = "correct horse battery";

export const PEOPLE = {
  admin: { id: "usr_t_admin", email: "admin@lab.test", name: "Test Admin", role: "admin" as Role },
  chemist: { id: "usr_t_chem", email: "chemist@lab.test", name: "Test Chemist", role: "chemist" as Role },
  chemist2: { id: "usr_t_chem2", email: "chemist2@lab.test", name: "Second Chemist", role: "chemist" as Role },
  formulator: { id: "usr_t_form", email: "formulator@lab.test", name: "Test Formulator", role: "formulator" as Role },
  retired: { id: "usr_t_retired", email: "retired@lab.test", name: "Retired Chemist", role: "chemist" as Role },
};

export type Who = keyof typeof PEOPLE;

let built = false;

export async function buildWorld() {
  if (built) return;
  built = true;
  const handle = db();
  seedSolvents(handle);
  const hash = await hashPassword(PASSWORD);
  for (const p of Object.values(PEOPLE)) handle.insert(users).values({ ...p, passwordHash: hash }).run();
  handle.insert(dyes).values({ id: "dye_t1", code: "T-001", name: "Test Violet", dyeClass: "merocyanine", synonyms: ["TV1"] }).run();
  handle.insert(conditions).values({ id: "cond_t1", solventId: "solv-methanol", acidBase: "neutral" }).run();
  addMeasurement("ms_t1", PEOPLE.chemist.id);
  // The retired chemist signed in and made a token while active, then was deactivated.
  const { sessionId } = await signInWithPassword(handle, { email: PEOPLE.retired.email, password: PASSWORD, ip: "test" });
  retired.session = sessionId;
  retired.token = createApiToken(handle, { userId: PEOPLE.retired.id, name: "old script", actorId: null }).token;
  handle.update(users).set({ deactivatedAt: new Date() }).where(eq(users.id, PEOPLE.retired.id)).run();
}

export const retired = { session: "", token: "" };

export function addMeasurement(id: string, createdBy: string, reviewState: "pending" | "accepted" = "pending") {
  db()
    .insert(measurements)
    .values({ id, dyeId: "dye_t1", conditionId: "cond_t1", rawR: 0.2, rawG: 0.1, rawB: 0.3, x: 10, y: 8, z: 20, l: 34, a: 30, b: -35, pixelCount: 1000, rejectedCount: 0, spread: 0.4, createdBy, reviewState })
    .run();
}

/** Opens a real session for the person and makes it "the current request's" cookie. */
export async function actAs(who: Who | "anonymous"): Promise<void> {
  if (who === "anonymous") return requestContext.reset({}, { host: "localhost:3000", origin: "http://localhost:3000" });
  const sessionId = who === "retired" ? retired.session : (await signInWithPassword(db(), { email: PEOPLE[who].email, password: PASSWORD, ip: "test" })).sessionId;
  requestContext.reset({ [SESSION_COOKIE]: sessionId }, { host: "localhost:3000", origin: "http://localhost:3000" });
}

export async function sessionCookieFor(who: Who): Promise<string> {
  if (who === "retired") return `${SESSION_COOKIE}=${retired.session}`;
  const { sessionId } = await signInWithPassword(db(), { email: PEOPLE[who].email, password: PASSWORD, ip: "test" });
  return `${SESSION_COOKIE}=${sessionId}`;
}

export function tokenFor(who: Who, { revoked = false } = {}): string {
  if (who === "retired") return retired.token;
  const { id, token } = createApiToken(db(), { userId: PEOPLE[who].id, name: `test ${who}`, actorId: null });
  if (revoked) revokeApiToken(db(), { tokenId: id, userId: PEOPLE[who].id, actorId: PEOPLE[who].id });
  return token;
}

export function form(fields: Record<string, string>): FormData {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.append(k, v);
  return fd;
}

/**
 * Runs a server action that ends in a redirect and returns where it sent the browser; fails with the
 * action's own answer when it returned instead (a refusal names what was wrong).
 */
export async function redirectOf(promise: Promise<unknown>): Promise<string> {
  let answer: unknown;
  try {
    answer = await promise;
  } catch (error) {
    const digest = (error as { digest?: unknown }).digest;
    if (typeof digest === "string" && digest.startsWith("NEXT_REDIRECT;")) return digest.split(";")[2];
    throw error;
  }
  throw new Error(`expected a redirect, the action answered ${JSON.stringify(answer)}`);
}
