/**
 * A chemist uploads an absorbance CSV on a demo dye's page, in Chromium: a bad file is refused with its
 * line and column and stores nothing; a good one is previewed (λmax, colour) and, once saved, appears in
 * the dye's spectra chart. The spectrum is a Gaussian band in wavenumber made here (common practice, no
 * source), maximum at 560 nm.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, inject, it } from "vitest";
import { useBrowser, watchConsole } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();
// A demo azo dye without spectra in the seed (tests/e2e/acid-base.test.ts uses the sulfonephthalein).
const DYE = "KB-AZ-177";

function bandCsv(): string {
  const rows = ["Wavelength (nm),Abs"];
  for (let nm = 800; nm >= 350; nm -= 1) rows.push(`${nm},${(0.85 * Math.exp(-4 * Math.LN2 * ((1e7 / nm - 1e7 / 560) / 3600) ** 2)).toFixed(5)}`);
  return rows.join("\n") + "\n";
}

function write(name: string, text: string): string {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-spectrum-")), name);
  fs.writeFileSync(file, text);
  return file;
}

describe("spectrum upload on a dye page", () => {
  it("refuses a bad file by line and column, then previews, saves and charts a good one", async () => {
    const page = await browser().newPage();
    const errors = watchConsole(page);
    const signIn = new SignInPage(page, base);
    await signIn.signIn("chemist@demo.test");
    const dyeId = ((await (await page.request.get(`${base}/api/dyes?q=${DYE}`)).json()).dyes as { id: string; code: string }[]).find((d) => d.code === DYE)!.id;
    const storedBefore = ((await (await page.request.get(`${base}/api/spectra?dyeId=${dyeId}`)).json()).spectra as unknown[]).length;

    await page.goto(`${base}/catalogue/${DYE}`);
    const form = page.getByRole("form", { name: "Upload a spectrum" });
    await form.waitFor();
    await form.getByLabel("Solvent", { exact: true }).selectOption({ label: "Acetonitrile" });
    await form.getByLabel("Instrument").fill("E2E UV-Vis, 10 mm quartz");

    // Line 52 is 750 nm; its absorbance is an overflow mark.
    const bad = bandCsv().replace("\n750,", "\n750,OVER");
    await page.getByTestId("spectrum-input").setInputFiles(write("bad.csv", bad));
    await form.getByRole("button", { name: "Check and preview" }).click();
    const problem = page.getByTestId("import-problem");
    await problem.first().waitFor();
    await expect(problem.first().innerText()).resolves.toMatch(/^52\s+Abs\s+“OVER/);
    await expect(form.getByRole("button", { name: "Save the spectrum" }).isDisabled()).resolves.toBe(true);

    await page.getByTestId("spectrum-input").setInputFiles(write("acetonitrile.csv", bandCsv()));
    await form.getByRole("button", { name: "Check and preview" }).click();
    const preview = page.getByTestId("spectrum-preview");
    await preview.waitFor();
    await expect(preview.innerText()).resolves.toMatch(/451 samples, 350\.0–800\.0 nm, step 1\.00 nm \(uniform\), long to short wavelengths in the file\. λmax: 560\.\d nm/);
    expect(((await (await page.request.get(`${base}/api/spectra?dyeId=${dyeId}`)).json()).spectra as unknown[]).length).toBe(storedBefore);

    await form.getByRole("button", { name: "Save the spectrum" }).click();
    await expect.poll(() => page.getByTestId("spectrum-message").innerText(), { timeout: 30_000 }).toMatch(/Saved the spectrum \(λmax 560\.\d nm\)/);
    await page.getByRole("heading", { name: /Absorption spectra \(\d+\)/ }).waitFor({ timeout: 30_000 });
    const chart = page.getByTestId("spectra-chart").first();
    await chart.locator("svg path").first().waitFor({ state: "attached", timeout: 30_000 });
    const row = page.getByTestId("spectrum-row").filter({ hasText: "acetonitrile.csv" });
    await expect(row.innerText()).resolves.toMatch(/Acetonitrile[\s\S]*E2E UV-Vis[\s\S]*560\.\d/);
    expect(((await (await page.request.get(`${base}/api/spectra?dyeId=${dyeId}`)).json()).spectra as unknown[]).length).toBe(storedBefore + 1);
    expect(errors).toEqual([]);
    await signIn.signOut();
    await page.close();
  }, 180_000);
});
