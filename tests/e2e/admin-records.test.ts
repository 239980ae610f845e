/**
 * The admin's records: an invitation shows up in the audit log (filtered by who and what, linked to
 * its record, the action in words with its code beside them, the change written out), the audit CSV
 * carries it, and the local mailbox shows the invitation link as a link that opens the invitation page.
 */
import fs from "node:fs";
import { describe, expect, inject, it } from "vitest";
import { useBrowser } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();

describe("the admin's records", () => {
  it("finds an invitation in the audit log and its link in the mailbox", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await new SignInPage(page, base).signIn("admin@demo.test");
    await page.goto(`${base}/people`);
    const form = page.getByTestId("invite-form");
    await form.getByLabel("Name").fill("Ines Tarrant");
    await form.getByLabel("E-mail").fill("ines.tarrant@lab.test");
    await form.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText(/ines\.tarrant@lab\.test/).first().waitFor();

    await page.goto(`${base}/people/audit?who=usr_demo_admin&what=invitation.create`);
    const entries = page.getByTestId("audit-entry");
    expect(await entries.count()).toBeGreaterThanOrEqual(1);
    expect(await entries.count()).toBeLessThanOrEqual(40);
    const first = entries.first();
    // Words from lib/audit/actions.ts, the stored code beside them; the CSV below keeps the code alone.
    expect(await first.getByTestId("audit-action").innerText()).toBe("sent an invitation");
    expect(await first.getByTestId("audit-code").innerText()).toBe("invitation.create");
    await first.getByText(/field.? changed/).click();
    expect(await first.innerText()).toMatch(/ines\.tarrant@lab\.test/);

    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: /Export these entries as CSV/ }).click()]);
    const csv = fs.readFileSync((await download.path())!, "utf8");
    expect(csv.split(/\r?\n/)[0]).toBe("id,at_utc,who,what,record,record_id,changes");
    expect(csv).toMatch(/Ada Okonkwo,invitation\.create,invitation,.*ines\.tarrant@lab\.test/);

    await page.goto(`${base}/people/mailbox`);
    const message = page.getByTestId("mail-message").filter({ hasText: "ines.tarrant@lab.test" }).first();
    const link = message.locator('a[href*="/invite/"]').first();
    const href = await link.getAttribute("href");
    expect(href).toMatch(/^https?:\/\/.+\/invite\/[A-Za-z0-9_-]+$/);
    await page.close();
  });

  it("pages the audit log 40 entries at a time", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await new SignInPage(page, base).signIn("admin@demo.test");
    await page.goto(`${base}/people/audit`);
    const status = await page.getByRole("status").filter({ hasText: /of \d/ }).innerText();
    const total = Number(/of ([\d,]+)/.exec(status)![1].replace(/,/g, ""));
    expect(await page.getByTestId("audit-entry").count()).toBe(Math.min(total, 40));
    if (total > 40) {
      await page.getByRole("link", { name: "Older →" }).click();
      await page.waitForURL(/page=2/);
      expect(await page.getByTestId("audit-entry").count()).toBe(Math.min(total - 40, 40));
    }
    await page.close();
  });
});
