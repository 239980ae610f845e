import { describe, expect, inject, it } from "vitest";
import { useBrowser, watchConsole } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();

const EXPECTED_NAV = {
  "admin@demo.test": ["Overview", "Bench", "Review", "Lighting", "Catalogue", "Measurements", "pH series", "Solvents", "Search", "Tune", "Compare", "Shortlists", "People"],
  "chemist@demo.test": ["Overview", "Bench", "Review", "Lighting", "Catalogue", "Measurements", "pH series", "Solvents", "Search", "Tune", "Compare", "Shortlists"],
  "formulator@demo.test": ["Overview", "Lighting", "Catalogue", "Measurements", "pH series", "Solvents", "Search", "Tune", "Compare", "Shortlists"],
} as const;

describe("each demo user", () => {
  it.each(Object.entries(EXPECTED_NAV))("%s signs in and sees the navigation of the role", async (email, nav) => {
    const page = await browser().newPage();
    const errors = watchConsole(page);
    const signIn = new SignInPage(page, base);
    await signIn.signIn(email);
    expect(await signIn.mainNavLabels()).toEqual(nav);
    const role = email.split("@")[0];
    // The role shows in the top bar and again in the phone menu: read the first.
    expect((await page.getByTestId("current-role").first().innerText()).toLowerCase()).toBe(role);
    await page.goto(`${base}/catalogue`);
    expect(await page.locator("tbody tr").count()).toBeGreaterThanOrEqual(30);
    await page.goto(`${base}/solvents`);
    expect(await page.getByTestId("solvent-row").count()).toBeGreaterThanOrEqual(30);
    await signIn.signOut();
    expect(errors).toEqual([]);
    await page.close();
  });

  it.each(["chemist@demo.test", "formulator@demo.test"])("%s is refused the admin page with a clear message", async (email) => {
    const page = await browser().newPage();
    const signIn = new SignInPage(page, base);
    await signIn.signIn(email);
    await page.goto(`${base}/people`);
    const refused = page.getByTestId("refused");
    await expect(refused.innerText()).resolves.toMatch(/People is for admins/);
    await expect(refused.innerText()).resolves.toMatch(/ask an admin/i);
    await signIn.signOut();
    await page.close();
  });

  it("the formulator is refused the bench", async () => {
    const page = await browser().newPage();
    const signIn = new SignInPage(page, base);
    await signIn.signIn("formulator@demo.test");
    await page.goto(`${base}/bench`);
    await expect(page.getByTestId("refused").innerText()).resolves.toMatch(/bench is for admins and chemists/i);
    await signIn.signOut();
    await page.close();
  });

  it("a wrong password is refused with a message that says what to do", async () => {
    const page = await browser().newPage();
    await page.goto(`${base}/sign-in`);
    await page.getByLabel("E-mail").fill("chemist@demo.test");
    await page.getByLabel("Password").fill("not the password");
    await page.getByRole("button", { name: "Sign in" }).click();
    // Next's route announcer is also an alert region; look for ours by its text.
    const alert = page.getByRole("alert").filter({ hasText: /do not match/ });
    await alert.waitFor();
    expect(await alert.innerText()).toMatch(/Check both and try again/);
    await page.close();
  });
});
