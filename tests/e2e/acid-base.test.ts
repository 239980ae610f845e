/**
 * An indicator dye's page on the demo, in Chromium: the titration curve of its pH series, its pKa with
 * an uncertainty, and its absorption spectra with λmax; the pH series page lists its grouped series.
 */
import { describe, expect, inject, it } from "vitest";
import { useBrowser, watchConsole } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();

describe("an indicator dye's page", () => {
  it("shows the titration curve, the pKa ± its uncertainty and the spectra with λmax", async () => {
    const page = await browser().newPage();
    const errors = watchConsole(page);
    await new SignInPage(page, base).signIn("chemist@demo.test");
    // KB-SP-205 is a demo sulfonephthalein with a 13-vial universal-buffer series and spectra.
    await page.goto(`${base}/catalogue/KB-SP-205`);
    await page.getByRole("heading", { name: "pKa and titration curve" }).waitFor();
    const pka = page.getByTestId("pka-value").first();
    await expect(pka.innerText()).resolves.toMatch(/^pKa \d+\.\d\d ± \d+\.\d\d$/);
    const curve = page.getByTestId("titration-curve").first();
    await curve.waitFor();
    // The fitted line and one dot per vial are drawn (the chart draws after it has measured its box: wait for it).
    await curve.locator("svg path").first().waitFor({ state: "attached", timeout: 30_000 });
    await expect.poll(() => curve.locator("circle").count(), { timeout: 30_000 }).toBeGreaterThanOrEqual(5);
    await expect(page.getByText(/Apparent pKa in Water/).first().innerText()).resolves.toMatch(/ionic strength/);

    await page.getByRole("heading", { name: /Absorption spectra/ }).waitFor();
    const chart = page.getByTestId("spectra-chart");
    await chart.waitFor();
    await chart.locator("svg path").first().waitFor({ state: "attached", timeout: 30_000 });
    const rows = page.getByTestId("spectrum-row");
    expect(await rows.count()).toBeGreaterThanOrEqual(2);
    await expect(rows.first().innerText()).resolves.toMatch(/\d{3}\.\d/);
    // Beer–Lambert: a longer path darkens the colour shown.
    const before = await rows.first().locator("span").first().getAttribute("style");
    await page.getByLabel("Path length (mm)").fill("40");
    await expect.poll(async () => rows.first().locator("span").first().getAttribute("style")).not.toBe(before);

    // The demo's series arrive grouped: the pH series page lists this one with its stored pKa and transition.
    await page.goto(`${base}/acid-base`);
    const row = page.getByTestId("ph-series-row").filter({ hasText: "KB-SP-205" }).first();
    await row.waitFor({ timeout: 60_000 });
    await expect(row.innerText()).resolves.toMatch(/\d+\.\d\d ± \d+\.\d\d[\s\S]*pH \d+\.\d–\d+\.\d/);
    // A chemist opens the series to edit it: the dye's vials in that medium, the grouped ones ticked, each with its pH.
    await row.getByRole("link", { name: "Water, all recorded pH values" }).click();
    const candidates = page.getByTestId("series-candidates");
    await candidates.waitFor({ timeout: 60_000 });
    await expect.poll(() => candidates.locator('input[type="checkbox"]:checked').count(), { timeout: 30_000 }).toBeGreaterThanOrEqual(5);

    // Search by pH transition: the demo indicator changes colour within pH 2–12 and the rule is stated.
    await page.goto(`${base}/search/ph?phFrom=2&phTo=12`);
    await expect(page.getByTestId("ph-rule").innerText()).resolves.toMatch(/wholly within/);
    const hit = page.getByTestId("ph-hit").filter({ hasText: "KB-SP-205" }).first();
    await hit.waitFor({ timeout: 60_000 });
    await expect(hit.innerText()).resolves.toMatch(/apparent pKa \d+\.\d\d ± \d+\.\d\d[\s\S]*transition pH \d+\.\d–\d+\.\d/);
    await page.goto(`${base}/acid-base/import`);
    await page.getByRole("heading", { name: "Import a pH series from CSV" }).waitFor();
    expect(errors).toEqual([]);
    await page.close();
  }, 180_000);
});
