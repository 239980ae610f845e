/**
 * Every main page, for every role, on a 390 × 844 phone (the CSS viewport of a common 6.1-inch phone;
 * common practice, no source): the document is never wider than the screen, so nothing has to be
 * scrolled sideways except inside its own scroll box. The header stays one row (≤ 64 px).
 * The same walk saves the admin's view of each page at 1440 and 390 px under tests/e2e/__screenshots__
 * so the next person can see the look (set E2E_SCREENSHOTS=0 to skip writing them).
 */
import fs from "node:fs";
import path from "node:path";
import { describe, expect, inject, it } from "vitest";
import { useBrowser } from "./browser";
import { SignInPage } from "./pages/sign-in-page";

const base = inject("baseUrl");
const browser = useBrowser();
const SHOTS = path.join(process.cwd(), "tests", "e2e", "__screenshots__");
const writeShots = process.env.E2E_SCREENSHOTS !== "0";

const EVERYONE = ["/", "/catalogue", "/catalogue/KB-AQ-310", "/measurements", "/search", "/search/shift", "/compare", "/solvents", "/lighting", "/shortlists", "/account"];
const BENCH = ["/bench", "/bench/photos/ph_demo_0001", "/review"];
const PAGES: Record<string, string[]> = {
  "formulator@demo.test": EVERYONE,
  "chemist@demo.test": [...EVERYONE, ...BENCH],
  "admin@demo.test": [...EVERYONE, ...BENCH, "/solvents/solv-1-4-dioxane", "/people", "/people/audit", "/people/mailbox"],
};

function shotName(width: number, route: string) {
  const slug = route === "/" ? "overview" : route.slice(1).replace(/[^a-z0-9]+/gi, "-");
  return `${slug}-${width}.png`;
}

/** The admin sees every main page; one set of pictures is enough. Very long pages are cut at 4,000 px. */
async function shoot(page: import("playwright-core").Page, email: string, width: number, route: string) {
  if (!writeShots || !email.startsWith("admin@")) return;
  fs.mkdirSync(SHOTS, { recursive: true });
  const height = await page.evaluate(() => document.documentElement.scrollHeight);
  await page.screenshot({ path: path.join(SHOTS, shotName(width, route)), fullPage: true, clip: { x: 0, y: 0, width, height: Math.min(height, 4000) } });
}

describe("on a 390 px phone", () => {
  it.each(Object.entries(PAGES))("%s: no main page is wider than the screen", async (email, routes) => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await page.setViewportSize({ width: 390, height: 844 });
    await new SignInPage(page, base).signIn(email);
    const wide: string[] = [];
    for (const route of routes) {
      await page.goto(base + route);
      await page.waitForLoadState("networkidle");
      const m = await page.evaluate(() => ({
        scrollWidth: document.documentElement.scrollWidth,
        innerWidth: window.innerWidth,
        header: document.querySelector("body header")?.getBoundingClientRect().height ?? 0,
      }));
      if (m.scrollWidth > m.innerWidth) wide.push(`${route}: ${m.scrollWidth} px wide`);
      expect(m.header, `header height on ${route}`).toBeLessThanOrEqual(64);
      await shoot(page, email, 390, route);
    }
    expect(wide).toEqual([]);
    await page.close();
  });

  it("lists pH series as cards, each pKa with its unit in view without scrolling sideways", { timeout: 300_000 }, async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await page.setViewportSize({ width: 390, height: 844 });
    await new SignInPage(page, base).signIn("formulator@demo.test");
    // The list brings every series' stored fit up to date first (all of them on a fresh demo): allow for it.
    await page.goto(`${base}/acid-base`, { timeout: 240_000 });
    const cards = page.getByTestId("ph-series-card");
    await cards.first().waitFor({ timeout: 60_000 });
    expect(await page.getByTestId("ph-series-list").isVisible()).toBe(false);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    const pkas = page.getByTestId("ph-series-card-pka");
    expect(await pkas.count()).toBeGreaterThan(0);
    for (const pka of await pkas.all()) {
      await expect(pka.innerText()).resolves.toMatch(/\d+\.\d\d ± (\d+\.\d\d|—) pH units$/);
      const box = (await pka.boundingBox())!;
      expect(box.x + box.width).toBeLessThanOrEqual(390);
    }
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.getByTestId("ph-series-list").waitFor();
    expect(await cards.first().isVisible()).toBe(false);
    expect(await page.getByTestId("ph-series-row").count()).toBe(await cards.count());
    await page.close();
  });

  it("the phone menu opens over the page, reaches every area and closes after a choice", async () => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await page.setViewportSize({ width: 390, height: 844 });
    await new SignInPage(page, base).signIn("chemist@demo.test");
    await page.getByText("Menu", { exact: true }).click();
    const menu = page.locator("details[open] nav[aria-label=Main]");
    expect(await menu.getByRole("link").allInnerTexts()).toEqual(["Overview", "Bench", "Review", "Lighting", "Catalogue", "Measurements", "pH series", "Solvents", "Search", "Tune", "Compare", "Shortlists"]);
    await menu.getByRole("link", { name: "Solvents" }).click();
    await page.waitForURL(`${base}/solvents`);
    await expect.poll(() => page.locator("details[open]").count()).toBe(0);
    await page.close();
  });
});

describe("at 1440 px", () => {
  it.each(Object.entries(PAGES))("%s: no main page is wider than the screen", async (email, routes) => {
    const page = await browser().newPage();
    await page.context().clearCookies();
    await page.setViewportSize({ width: 1440, height: 900 });
    await new SignInPage(page, base).signIn(email);
    for (const route of routes) {
      await page.goto(base + route);
      await page.waitForLoadState("networkidle");
      expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth), route).toBe(true);
      await shoot(page, email, 1440, route);
    }
    await page.close();
  });
});
