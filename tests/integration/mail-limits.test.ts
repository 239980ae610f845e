/**
 * Mail the app sends on request (issue 11, defect 7): shortlists go only to people of the lab, with
 * no person-written text in the subject and a per-person limit; password-reset requests are limited
 * per client address and per account. The limits are this app's settings (common practice, no source).
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { requestResetAction } from "@/app/actions/auth";
import { createShortlistAction, shareShortlistAction } from "@/app/actions/shortlists";
import { mailboxDir } from "@/lib/mail";
import { requestContext } from "../support/request-context";
import { actAs, buildWorld, form, PEOPLE } from "../support/world";

type Mail = { to: string; subject: string; text: string };

function mailbox(): Mail[] {
  if (!fs.existsSync(mailboxDir())) return [];
  return fs.readdirSync(mailboxDir()).sort().map((f) => JSON.parse(fs.readFileSync(path.join(mailboxDir(), f), "utf8")));
}

let shortlistId = "";

beforeAll(async () => {
  await buildWorld();
  await actAs("formulator");
  const made = await createShortlistAction(null, form({ name: "WIN A PRIZE http://evil.example", notes: "" }));
  shortlistId = (made?.data as { id: string }).id;
});

describe("sharing a shortlist", () => {
  it("refuses an address outside the lab and sends nothing", async () => {
    await actAs("formulator");
    const before = mailbox().length;
    const state = await shareShortlistAction(null, form({ shortlistId, email: "victim@elsewhere.example", message: "Click here" }));
    expect(state).toMatchObject({ ok: false, code: "invalid_input" });
    expect(state?.message).toMatch(/people of your lab/);
    expect(mailbox().length).toBe(before);
  });

  it("refuses a deactivated colleague", async () => {
    await actAs("formulator");
    expect(await shareShortlistAction(null, form({ shortlistId, email: PEOPLE.retired.email, message: "" }))).toMatchObject({ ok: false, code: "invalid_input" });
  });

  it("sends to a colleague with a subject that carries no person-written text, and stops after the hourly allowance", async () => {
    await actAs("formulator");
    const state = await shareShortlistAction(null, form({ shortlistId, email: PEOPLE.chemist.email, message: "Have a look" }));
    expect(state).toMatchObject({ ok: true });
    const mail = mailbox().filter((m) => m.to === PEOPLE.chemist.email).at(-1)!;
    expect(mail.subject).not.toContain("evil.example");
    expect(mail.subject).not.toContain("WIN A PRIZE");
    let refused = null;
    for (let i = 0; i < 40 && !refused; i++) {
      const next = await shareShortlistAction(null, form({ shortlistId, email: PEOPLE.chemist.email, message: "" }));
      if (!next?.ok) refused = next;
    }
    expect(refused).toMatchObject({ ok: false, code: "rate_limited" });
  });
});

describe("password-reset requests", () => {
  it("send at most a few mails per account per hour, with the same answer as before", async () => {
    requestContext.reset({}, { host: "localhost:3000", origin: "http://localhost:3000" });
    const sent = () => mailbox().filter((m) => m.to === PEOPLE.chemist2.email && /reset/i.test(m.subject)).length;
    const before = sent();
    for (let i = 0; i < 8; i++) {
      requestContext.reset({}, { host: "localhost:3000", "x-forwarded-for": `198.51.100.${i}` });
      const state = await requestResetAction(null, form({ email: PEOPLE.chemist2.email }));
      expect(state).toMatchObject({ ok: true });
    }
    expect(sent() - before).toBeLessThanOrEqual(3);
    expect(sent() - before).toBeGreaterThan(0);
  });

  it("are refused from one address after the hourly allowance, whatever addresses are asked for", async () => {
    let refused = null;
    for (let i = 0; i < 30 && !refused; i++) {
      requestContext.reset({}, { host: "localhost:3000", "x-forwarded-for": "203.0.113.20" });
      const state = await requestResetAction(null, form({ email: `someone${i}@lab.test` }));
      if (!state?.ok) refused = state;
    }
    expect(refused).toMatchObject({ ok: false, code: "rate_limited" });
    expect(refused?.message).toMatch(/Wait an hour/);
  });
});
