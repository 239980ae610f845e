import { expect, inject, it } from "vitest";
import { useBrowser } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();

it("an admin invites a chemist; the mail appears in the local mailbox; its link sets a password; the chemist signs in", async () => {
  const admin = await browser().newPage();
  const adminSession = new SignInPage(admin, base);
  await adminSession.signIn("admin@demo.test");
  await admin.goto(`${base}/people`);
  const invite = admin.getByTestId("invite-form");
  await invite.getByLabel("Name").fill("Noor Haddad");
  await invite.getByLabel("E-mail").fill("noor.haddad@demo.test");
  await invite.getByLabel("Role").selectOption("chemist");
  await invite.getByRole("button", { name: "Send invitation" }).click();
  await expect(admin.getByText(/Invitation for noor.haddad@demo.test written to the local mailbox/).waitFor()).resolves.toBeUndefined();

  await admin.goto(`${base}/people/mailbox`);
  const message = admin.getByTestId("mail-message").filter({ hasText: "noor.haddad@demo.test" }).first();
  const text = await message.innerText();
  const link = /http:\/\/\S+\/invite\/[A-Za-z0-9_-]+/.exec(text)?.[0];
  expect(link).toBeTruthy();
  await adminSession.signOut();

  const newcomer = await browser().newPage();
  await newcomer.goto(link!);
  await expect(newcomer.getByText("Welcome, Noor Haddad").waitFor()).resolves.toBeUndefined();
  await newcomer.getByLabel("New password").fill("pipette and cuvette");
  await newcomer.getByLabel("The same password again").fill("pipette and cuvette");
  await newcomer.getByRole("button", { name: "Set password and sign in" }).click();
  await newcomer.waitForURL(`${base}/`);
  expect((await newcomer.getByTestId("current-role").first().innerText()).toLowerCase()).toBe("chemist");
  const nc = new SignInPage(newcomer, base);
  await nc.signOut();

  // The link works once; the new password works from the sign-in page.
  await newcomer.goto(link!);
  await expect(newcomer.getByText("This invitation no longer works").waitFor()).resolves.toBeUndefined();
  await nc.signIn("noor.haddad@demo.test", "pipette and cuvette");
  expect(await nc.mainNavLabels()).toContain("Bench");
});
