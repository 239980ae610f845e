import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { isRedirectError } from "next/dist/client/components/redirect-error";
import { db } from "@/db/client";
import { invitations, passwordResets } from "@/db/schema";
import { acceptInvitationAction, completeResetAction, requestResetAction, signInAction, signOutAction } from "@/app/actions/auth";
import { inviteAction } from "@/app/actions/people";
import { createInvitation, createPasswordReset, signInWithPassword } from "@/lib/auth/service";
import { SESSION_COOKIE } from "@/lib/auth/lucia";
import { mailboxDir } from "@/lib/mail";
import { requestContext } from "../support/request-context";
import { actAs, buildWorld, form, PASSWORD, PEOPLE } from "../support/world";

beforeAll(async () => {
  await buildWorld();
});

async function expectRedirect(promise: Promise<unknown>, to: string) {
  try {
    await promise;
  } catch (error) {
    expect(isRedirectError(error)).toBe(true);
    expect((error as { digest: string }).digest).toContain(to);
    return;
  }
  throw new Error(`expected a redirect to ${to}`);
}

function linkFromMailbox(to: string, pathPrefix: string): string {
  const files = fs.readdirSync(mailboxDir()).sort().reverse();
  for (const f of files) {
    const mail = JSON.parse(fs.readFileSync(path.join(mailboxDir(), f), "utf8"));
    if (mail.to !== to) continue;
    const match = new RegExp(`${pathPrefix}/([A-Za-z0-9_-]+)`).exec(mail.text);
    if (match) return match[1];
  }
  throw new Error(`no ${pathPrefix} link for ${to} in the mailbox`);
}

describe("invitations", () => {
  it("an admin's invitation lands in the local mailbox and its link makes an account, once", async () => {
    await actAs("admin");
    const state = await inviteAction(null, form({ email: "Newbie@Lab.test", name: "New Bie", role: "formulator" }));
    expect(state).toMatchObject({ ok: true });
    expect(state?.message).toMatch(/local mailbox/);
    const secret = linkFromMailbox("newbie@lab.test", "/invite");

    requestContext.reset({}, { host: "localhost:3000" });
    await expectRedirect(acceptInvitationAction(null, form({ token: secret, password: "a fresh password", confirm: "a fresh password" })), "/");
    expect(requestContext.cookie(SESSION_COOKIE)).toBeTruthy();
    const signedIn = await signInWithPassword(db(), { email: "newbie@lab.test", password: "a fresh password", ip: "t" });
    expect(signedIn.user.role).toBe("formulator");

    requestContext.reset({}, { host: "localhost:3000" });
    const again = await acceptInvitationAction(null, form({ token: secret, password: "another password", confirm: "another password" }));
    expect(again).toMatchObject({ ok: false, code: "invalid_input" });
    expect(again?.message).toMatch(/expired or was already used/);
  });

  it("an expired invitation is refused", async () => {
    const { secret, id } = createInvitation(db(), { email: "late@lab.test", name: "Late", role: "chemist", invitedBy: PEOPLE.admin.id });
    db().update(invitations).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(invitations.id, id)).run();
    const state = await acceptInvitationAction(null, form({ token: secret, password: "a fresh password", confirm: "a fresh password" }));
    expect(state).toMatchObject({ ok: false, code: "invalid_input" });
  });

  it("refuses to invite an address that already has an account", async () => {
    await actAs("admin");
    const state = await inviteAction(null, form({ email: PEOPLE.chemist.email, name: "Dup", role: "chemist" }));
    expect(state).toMatchObject({ ok: false, code: "conflict" });
    expect(state?.fieldErrors?.email).toBeTruthy();
  });
});

describe("password resets", () => {
  it("a reset link sets a new password once and ends the person's other sessions", async () => {
    const before = await signInWithPassword(db(), { email: PEOPLE.chemist2.email, password: PASSWORD, ip: "t" });
    requestContext.reset({}, { host: "localhost:3000" });
    const ask = await requestResetAction(null, form({ email: PEOPLE.chemist2.email }));
    expect(ask).toMatchObject({ ok: true });
    const secret = linkFromMailbox(PEOPLE.chemist2.email, "/reset");
    await expectRedirect(completeResetAction(null, form({ token: secret, password: "new secret phrase", confirm: "new secret phrase" })), "/sign-in");
    await expect(signInWithPassword(db(), { email: PEOPLE.chemist2.email, password: "new secret phrase", ip: "t" })).resolves.toBeTruthy();
    const { validateSessionId } = await import("@/lib/auth/service");
    expect(await validateSessionId(db(), before.sessionId)).toBeNull();
    const reuse = await completeResetAction(null, form({ token: secret, password: "third secret phrase", confirm: "third secret phrase" }));
    expect(reuse).toMatchObject({ ok: false, code: "invalid_input" });
  });

  it("gives the same answer for unknown addresses and sends nothing", async () => {
    const count = () => (fs.existsSync(mailboxDir()) ? fs.readdirSync(mailboxDir()).length : 0);
    const n = count();
    const state = await requestResetAction(null, form({ email: "nobody@lab.test" }));
    expect(state).toMatchObject({ ok: true });
    expect(count()).toBe(n);
  });

  it("an expired reset link is refused", async () => {
    const reset = createPasswordReset(db(), { email: PEOPLE.formulator.email })!;
    db().update(passwordResets).set({ expiresAt: new Date(Date.now() - 1) }).where(eq(passwordResets.userId, PEOPLE.formulator.id)).run();
    const state = await completeResetAction(null, form({ token: reset.secret, password: "new secret phrase", confirm: "new secret phrase" }));
    expect(state).toMatchObject({ ok: false, code: "invalid_input" });
  });
});

describe("sign-in", () => {
  it("signs in, sets an HttpOnly session cookie and redirects only within the site", async () => {
    requestContext.reset({}, { host: "localhost:3000" });
    await expectRedirect(signInAction(null, form({ email: PEOPLE.formulator.email, password: PASSWORD, next: "//evil.example" })), ";/;");
    expect(requestContext.cookie(SESSION_COOKIE)).toBeTruthy();
    await expectRedirect(signOutAction(), "/sign-in");
    expect(requestContext.cookie(SESSION_COOKIE)).toBeUndefined();
  });

  it("refuses a deactivated account with a clear message", async () => {
    await expect(signInWithPassword(db(), { email: PEOPLE.retired.email, password: PASSWORD, ip: "t" })).rejects.toThrow(/deactivated/);
  });

  // Throttling has its own file: sign-in-throttle.test.ts.
});

describe("changing one's password", () => {
  it("needs the current password, then ends the person's other sessions but keeps this one", async () => {
    const { changePasswordAction } = await import("@/app/actions/auth");
    const { validateSessionId } = await import("@/lib/auth/service");
    const other = await signInWithPassword(db(), { email: PEOPLE.formulator.email, password: PASSWORD, ip: "t" });
    for (const who of ["anonymous", "retired"] as const) {
      await actAs(who);
      expect(await changePasswordAction(null, form({ currentPassword: PASSWORD, password: "brand new phrase", confirm: "brand new phrase" }))).toMatchObject({ ok: false, code: "unauthenticated" });
    }
    await actAs("formulator");
    const current = requestContext.cookie(SESSION_COOKIE)!;
    const wrong = await changePasswordAction(null, form({ currentPassword: "not it", password: "brand new phrase", confirm: "brand new phrase" }));
    expect(wrong).toMatchObject({ ok: false, code: "invalid_input" });
    const ok = await changePasswordAction(null, form({ currentPassword: PASSWORD, password: "brand new phrase", confirm: "brand new phrase" }));
    expect(ok).toMatchObject({ ok: true });
    expect(await validateSessionId(db(), other.sessionId)).toBeNull();
    expect(await validateSessionId(db(), current)).not.toBeNull();
    await expect(signInWithPassword(db(), { email: PEOPLE.formulator.email, password: "brand new phrase", ip: "t" })).resolves.toBeTruthy();
  });
});
