/**
 * Forms keep what was typed after a refusal, and the refusal uses the words on the screen (the
 * field's label), never the program's field names such as "casNumber" or "et30Source".
 */
import { describe, expect, inject, it } from "vitest";
import type { Page } from "playwright-core";
import { useBrowser } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();
const FIELD_NAMES = /\b(casNumber|dyeClass|molarMass|et30Source|et30Value|mediumSource|minShift|email|name):/;

/** Our alert, not Next's route announcer (which also has role=alert). */
async function alertText(page: Page, text: RegExp) {
  const alert = page.getByRole("alert").filter({ hasText: text });
  await alert.first().waitFor();
  return alert.first().innerText();
}

describe("a form refused", () => {
  it("sign-in keeps the e-mail address after a wrong password", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await page.goto(`${base}/sign-in`);
    await page.getByLabel("E-mail").fill("chemist@demo.test");
    await page.getByLabel("Password").fill("not the password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await alertText(page, /do not match/);
    expect(await page.getByLabel("E-mail").inputValue()).toBe("chemist@demo.test");
    await page.close();
  });

  it("the invitation keeps name, e-mail and role, and says what is wrong in words", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await new SignInPage(page, base).signIn("admin@demo.test");
    await page.goto(`${base}/people`);
    const form = page.getByTestId("invite-form");
    await form.getByLabel("Name").fill("Rosa Vell");
    await form.getByLabel("E-mail").fill("rosa.vell-at-lab");
    await form.getByLabel("Role").selectOption("formulator");
    await form.getByRole("button", { name: "Send invitation" }).click();
    const message = await alertText(page, /e-mail address/);
    expect(message).not.toMatch(FIELD_NAMES);
    expect(await form.getByLabel("Name").inputValue()).toBe("Rosa Vell");
    expect(await form.getByLabel("E-mail").inputValue()).toBe("rosa.vell-at-lab");
    expect(await form.getByLabel("Role").inputValue()).toBe("formulator");
    await page.close();
  });

  it("the dye form keeps every edit after a bad CAS number", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await new SignInPage(page, base).signIn("chemist@demo.test");
    await page.goto(`${base}/catalogue/KB-AQ-310`);
    const form = page.locator("form", { has: page.getByRole("button", { name: "Save dye" }) });
    await form.locator("input[name=name]").fill("Skerry Quinone 51 (recrystallised)");
    await form.locator("input[name=notes], textarea[name=notes]").fill("Batch 7, from the March order.");
    // 7732-18-5 is water's CAS number (CAS Registry); the last digit is its check digit, so …-4 is wrong.
    await form.locator("input[name=casNumber]").fill("7732-18-4");
    await form.getByRole("button", { name: "Save dye" }).click();
    const message = await alertText(page, /check digit|CAS/i);
    expect(message).not.toMatch(FIELD_NAMES);
    expect(await form.locator("input[name=name]").inputValue()).toBe("Skerry Quinone 51 (recrystallised)");
    expect(await form.locator("textarea[name=notes]").inputValue()).toBe("Batch 7, from the March order.");
    expect(await form.locator("input[name=casNumber]").inputValue()).toBe("7732-18-4");
    await page.close();
  });

  it("the solvent form keeps a value typed without its source and asks for the source by its label", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await new SignInPage(page, base).signIn("admin@demo.test");
    await page.goto(`${base}/solvents/solv-1-4-dioxane`);
    await page.locator("input[name=et30Value]").fill("36.1");
    await page.locator("input[name=et30Source]").fill("");
    await page.getByRole("button", { name: "Save solvent" }).click();
    const message = await alertText(page, /source of ET\(30\)/);
    expect(message).not.toMatch(FIELD_NAMES);
    expect(await page.locator("input[name=et30Value]").inputValue()).toBe("36.1");
    expect(await page.locator("input[name=et30Source]").inputValue()).toBe("");
    await page.close();
  });

  it("the shift search keeps its entries and names the field as labelled", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await new SignInPage(page, base).signIn("formulator@demo.test");
    await page.goto(`${base}/search/shift`);
    await page.getByLabel(/Colour in A/).fill("blurple");
    await page.getByLabel(/Minimum shift/).fill("12");
    await page.getByRole("button", { name: "Search", exact: true }).click();
    const message = await alertText(page, /could not run/);
    expect(message).toMatch(/Colour in A must be a colour word/);
    expect(message).not.toMatch(/\bfrom must\b/);
    expect(await page.getByLabel(/Colour in A/).inputValue()).toBe("blurple");
    expect(await page.getByLabel(/Minimum shift/).inputValue()).toBe("12");
    await page.close();
  });
});
