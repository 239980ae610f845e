/**
 * The demo formulator reads a dye's solvent model, sees its predicted colours (hatched, with ± ΔE00),
 * and uses tune to find a solvent or blend for a target colour, on the dye page and across dyes.
 */
import { expect, inject, it, describe } from "vitest";
import { useBrowser, watchConsole } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();

describe("solvent models in the browser", () => {
  it("opens a dye, reads the fit, sees predicted swatches and tunes a colour", async () => {
    const page = await browser().newPage();
    const errors = watchConsole(page);
    await new SignInPage(page, base).signIn("formulator@demo.test");

    await page.goto(`${base}/catalogue/KB-BT-107`, { timeout: 120_000 });
    const sentence = page.getByTestId("model-sentence");
    await sentence.waitFor();
    expect(await sentence.innerText()).toMatch(/most sensitive to hydrogen-bond donation \(α\): a = [\d,]+ ± [\d,]+ cm⁻¹/);
    const fits = page.getByRole("table", { name: "Fits side by side" });
    expect(await fits.innerText()).toMatch(/used for predictions/);
    expect(await fits.innerText()).toMatch(/baseline/);
    expect(await page.getByRole("table", { name: "Coefficients with standard errors" }).innerText()).toMatch(/± /);
    await expect(page.getByText(/is a guide, not a guarantee/).first().isVisible()).resolves.toBe(true);

    // Predicted swatches: hatched, labelled with their uncertainty, never alone as colour.
    const strip = page.getByTestId("model-strip");
    const predicted = strip.locator("[data-predicted=true]");
    expect(await predicted.count()).toBeGreaterThan(3);
    expect(await predicted.first().getAttribute("aria-label")).toMatch(/predicted .* ± \d+\.\d ΔE00 \(not measured\)/);
    expect(await strip.innerText()).toMatch(/predicted ± \d+\.\d/);
    if (process.env.MODELS_SCREENSHOTS) await page.screenshot({ path: `${process.env.MODELS_SCREENSHOTS}/dye.png`, fullPage: true });

    // Tune from the dye page: a colour word as the target.
    const form = page.getByRole("form", { name: "Tune this dye" });
    await form.getByPlaceholder("7a3fa0, 40,45,-50 or violet").fill("violet");
    await form.getByRole("button", { name: "Tune" }).click();
    await page.waitForURL(/\/tune\?dye=KB-BT-107/);
    const ranked = page.getByRole("table", { name: "Ranked solvents and blends" });
    await ranked.waitFor();
    const rows = ranked.locator("tbody tr");
    expect(await rows.count()).toBeGreaterThan(5);
    expect(await rows.first().innerText()).toMatch(/KB-BT-107/);
    expect(await ranked.innerText()).toMatch(/x₂ = 0\.\d \(mole fraction of /);
    expect(await ranked.innerText()).toMatch(/ideal mixing \(approximation\)/);
    await expect(page.getByRole("complementary", { name: "Safety" }).isVisible()).resolves.toBe(true);
    if (process.env.MODELS_SCREENSHOTS) await page.screenshot({ path: `${process.env.MODELS_SCREENSHOTS}/tune.png`, fullPage: true });

    // Across dyes: which dye, in which solvent or blend, comes closest to a hex colour.
    await page.goto(`${base}/tune?dye=all&target=2f6fb0`, { timeout: 180_000 });
    await ranked.waitFor();
    const codes = await ranked.locator("tbody tr td:nth-child(3) a").allInnerTexts();
    expect(new Set(codes).size).toBeGreaterThan(1);

    // A target that is not a colour is refused with a sentence that says what to give.
    await page.goto(`${base}/tune?dye=all&target=purple-ish`);
    await page.getByText(/Give the target colour as a hex colour/).waitFor();
    expect(errors.filter((e) => !/favicon/.test(e))).toEqual([]);
  }, 480_000);
});
