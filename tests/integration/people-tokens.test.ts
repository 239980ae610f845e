/**
 * People and their tokens (issue 11, defects 5 and 9): deactivating an account revokes its API tokens
 * for good, a password reset revokes them too, and role/activation changes for an unknown person say
 * so instead of answering "done".
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { completeResetAction, requestResetAction } from "@/app/actions/auth";
import { setActiveAction, setRoleAction } from "@/app/actions/people";
import { db } from "@/db/client";
import { auditLog } from "@/db/schema";
import { identifyCaller } from "@/lib/auth/request";
import { mailboxDir } from "@/lib/mail";
import { requestContext } from "../support/request-context";
import { actAs, buildWorld, form, PEOPLE, tokenFor } from "../support/world";

beforeAll(async () => {
  await buildWorld();
});

async function tokenWorks(token: string): Promise<boolean> {
  const caller = await identifyCaller(db(), new Headers({ authorization: `Bearer ${token}` }));
  return caller.kind === "user";
}

describe("deactivation revokes API tokens", () => {
  it("a token made before deactivation does not work again after reactivation", async () => {
    const token = tokenFor("chemist2");
    expect(await tokenWorks(token)).toBe(true);
    await actAs("admin");
    expect(await setActiveAction(null, form({ userId: PEOPLE.chemist2.id, active: "false" }))).toMatchObject({ ok: true });
    expect(await tokenWorks(token)).toBe(false);
    expect(await setActiveAction(null, form({ userId: PEOPLE.chemist2.id, active: "true" }))).toMatchObject({ ok: true });
    expect(await tokenWorks(token)).toBe(false);
    // The revocation is in the audit log.
    const entries = db().select().from(auditLog).where(and(eq(auditLog.action, "token.revoke-all"), eq(auditLog.entityId, PEOPLE.chemist2.id))).all();
    expect(entries.length).toBeGreaterThan(0);
    // A new token after reactivation works.
    expect(await tokenWorks(tokenFor("chemist2"))).toBe(true);
  });

  it("a password reset revokes the account's API tokens", async () => {
    const token = tokenFor("formulator");
    requestContext.reset({}, { host: "localhost:3000", origin: "http://localhost:3000" });
    expect(await requestResetAction(null, form({ email: PEOPLE.formulator.email }))).toMatchObject({ ok: true });
    const mails = fs.readdirSync(mailboxDir()).sort().reverse().map((f) => JSON.parse(fs.readFileSync(path.join(mailboxDir(), f), "utf8")));
    const secret = /\/reset\/([A-Za-z0-9_-]+)/.exec(mails.find((m) => m.to === PEOPLE.formulator.email).text)![1];
    await completeResetAction(null, form({ token: secret, password: "another good phrase", confirm: "another good phrase" })).catch(() => undefined);
    expect(await tokenWorks(token)).toBe(false);
  });
});

describe("changes for an unknown person", () => {
  it("role and activation changes for an unknown user answer not found and change nothing", async () => {
    await actAs("admin");
    const before = db().select().from(auditLog).all().length;
    const role = await setRoleAction(null, form({ userId: "usr_nobody", role: "chemist" }));
    expect(role).toMatchObject({ ok: false, code: "not_found" });
    expect(role?.message).toMatch(/no longer exists|no account/i);
    const active = await setActiveAction(null, form({ userId: "usr_nobody", active: "false" }));
    expect(active).toMatchObject({ ok: false, code: "not_found" });
    expect(db().select().from(auditLog).all().length).toBe(before);
  });
});
