/**
 * The formulator's flow in Chromium on the demo: "blue in an aprotic medium", open a hit, keep it on
 * a new shortlist, compare two dyes, export the shortlist as CSV.
 */
import fs from "node:fs";
import { describe, expect, inject, it } from "vitest";
import { useBrowser, watchConsole } from "./browser";
import { SearchPage } from "./pages/search-page";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();

describe("the demo formulator", () => {
  it("searches blue in an aprotic medium, shortlists a hit, compares two dyes and exports the shortlist", async () => {
    const page = await browser().newPage();
    const errors = watchConsole(page);
    const signIn = new SignInPage(page, base);
    await signIn.signIn("formulator@demo.test");

    const search = new SearchPage(page, base);
    await search.open();
    // The demo betaines are blue in dipolar aprotic solvents (hab 260–308°; "violet" starts at 310°, see lib/search/colour-words.ts).
    await search.searchWord("blue", "aprotic");
    // The query lives in the URL, so the search can be bookmarked and shared.
    expect(new URL(page.url()).searchParams.get("word")).toBe("blue");
    expect(new URL(page.url()).searchParams.get("medium")).toBe("aprotic");
    const codes = await search.hitCodes();
    expect(codes.length).toBeGreaterThanOrEqual(2);
    const betaine = codes.find((c) => c.startsWith("KB-BT-"));
    expect(betaine, `hits: ${codes.join(" | ")}`).toBeTruthy();
    const firstHit = search.hits().filter({ hasText: betaine! }).first();
    await expect(firstHit.innerText()).resolves.toMatch(/dipolar aprotic/);
    await expect(firstHit.innerText()).resolves.toMatch(/measured/);
    await expect(firstHit.innerText()).resolves.toMatch(/ΔE00 \d+\.\d/);

    // Open the hit and keep it on a new shortlist.
    const code = betaine!.split(" · ")[0];
    await firstHit.getByRole("link", { name: betaine! }).click();
    await page.waitForURL(`${base}/catalogue/${encodeURIComponent(code)}`);
    await page.getByRole("img", { name: /a\*b\* plane/ }).waitFor();
    const create = page.getByRole("form", { name: "New shortlist" });
    await create.getByLabel("Name of a new shortlist").fill("Blue in aprotic media");
    await create.getByLabel("Note on this dye (optional)").fill("deep blue in acetonitrile");
    await create.getByRole("button", { name: "Create and add" }).click();
    await page.getByText("Created “Blue in aprotic media” with this dye.").waitFor();
    await page.getByRole("link", { name: "Open the shortlist" }).click();
    await page.waitForURL(/\/shortlists\/sl_/);
    const shortlistUrl = page.url();
    await page.getByTestId("shortlist-item").first().waitFor();
    expect(await page.getByTestId("shortlist-item").count()).toBe(1);
    await expect(page.getByTestId("shortlist-item").innerText()).resolves.toContain(code);

    // Back to the bookmarked search; tick two dyes and compare them.
    await page.goto(`${base}/search?word=blue&medium=aprotic`);
    await search.hits().first().waitFor();
    await search.hits().nth(0).getByRole("checkbox").check();
    await search.hits().nth(1).getByRole("checkbox").check();
    await page.getByRole("link", { name: "Compare 2 dyes" }).click();
    await page.waitForURL(/\/compare\?dyes=/);
    await page.getByRole("heading", { name: "Compare dyes" }).waitFor();
    const matrix = page.getByRole("table", { name: "ΔE00 matrix" });
    await matrix.waitFor();
    expect(await matrix.locator("tbody tr").count()).toBe(2);
    await expect(matrix.locator("tbody tr").first().innerText()).resolves.toMatch(/0\.0/);

    // Export the shortlist.
    await page.goto(shortlistUrl);
    await page.getByTestId("shortlist-item").first().waitFor();
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Export CSV" }).click()]);
    expect(download.suggestedFilename()).toBe("Blue-in-aprotic-media.csv");
    const csv = fs.readFileSync((await download.path())!, "utf8");
    const lines = csv.trim().split(/\r?\n/);
    expect(lines[0]).toMatch(/^code,name,class,cas_number,molar_mass_g_mol,accepted_measurements,note,hazards,condition,solvent,.*,L,a,b,C,h_deg,/);
    // One row per condition the dye was accepted in, each carrying its colour and the solvent's parameters.
    expect(lines.length).toBeGreaterThan(2);
    for (const line of lines.slice(1)) {
      expect(line).toContain(code);
      expect(line).toContain("deep blue in acetonitrile");
    }
    expect(lines.slice(1).every((l) => /,(protic|dipolar-aprotic|nonpolar),(acid|neutral|base),/.test(l))).toBe(true);
    // The page shows the same colours: one swatch per exported condition, named, with its CIELAB and replicates.
    const tiles = page.getByTestId("shortlist-item").first().getByTestId("shortlist-colour");
    expect(await tiles.count()).toBe(lines.length - 1);
    await expect(tiles.first().innerText()).resolves.toMatch(/L\* -?\d+\.\d · a\* -?\d+\.\d · b\* -?\d+\.\d[\s\S]*\d+ replicates?/);
    expect(await tiles.first().getByRole("img").getAttribute("aria-label")).toMatch(/≈ L\*/);
    await expect(page.getByTestId("shortlist-colour-note").innerText()).resolves.toMatch(/Swatches are screen approximations/);

    await signIn.signOut();
    expect(errors).toEqual([]);
    await page.close();
  });
});
