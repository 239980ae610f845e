/**
 * The admin takes the lab from no calibration to an approved profile in Chromium: creates a target
 * from CSV, a draft profile, uploads a card photo, places the grid, fits, sees the residuals and
 * approves. The chemist then picks that profile on the bench and the live colour carries its ± value.
 *
 * The card photo is rendered through a synthetic camera that is not sRGB (lib/color/synthetic-camera.ts)
 * from invented spectra whose true Lab come from the CIE tables in tests/fixtures (tests/support/spectral-card.ts).
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import sharp from "sharp";
import { expect, inject, it } from "vitest";
import { renderSwatches, SYNTHETIC_CAMERAS } from "@/lib/color/synthetic-camera";
import { useBrowser, watchConsole } from "./browser";
import { MarkingPage } from "./pages/marking-page";
import { SignInPage } from "./pages/sign-in-page";
import { CARD, sceneXyzD65, spectrumLab, VIALS } from "../support/spectral-card";

const base = inject("baseUrl");
const browser = useBrowser();

const SIZE = 48;
const GAP = 10;
const COLUMNS = 6;
const ROWS = CARD.length / COLUMNS;

async function photo(seed: number, name: string) {
  const swatches = [...CARD.map((p) => sceneXyzD65(p.reflectance, "D65")), ...VIALS.map((v) => sceneXyzD65(v.transmittance, "D65"))];
  const r = renderSwatches(SYNTHETIC_CAMERAS.warmPhone, { swatches, columns: COLUMNS, size: SIZE, gap: GAP }, seed);
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-card-")), name);
  fs.writeFileSync(file, await sharp(Buffer.from(r.data), { raw: { width: r.width, height: r.height, channels: 3 } }).png().toBuffer());
  return { file, width: r.width, height: r.height, boxes: r.boxes };
}

it("the admin fits and approves a profile from a card photo; the chemist measures with it and sees ± values", async () => {
  const card = await photo(21, "card-e2e.png");
  const csv = ["name,L*,a*,b*,white point", ...CARD.map((p) => `${p.name},${spectrumLab(p.reflectance, "D65").map((v) => v.toFixed(3)).join(",")},D65`)].join("\n");

  await browser().clearCookies();
  const page = await browser().newPage();
  const errors = watchConsole(page);
  const admin = new SignInPage(page, base);
  await admin.signIn("admin@demo.test");
  await page.goto(`${base}/lighting`);
  // The demo's first profile ended in May 2026: it is shown as expired, in words.
  await expect(page.getByTestId("profile-status").filter({ hasText: "Expired" }).count()).resolves.toBeGreaterThan(0);

  const target = page.getByRole("form", { name: "New calibration target" });
  await target.getByLabel("Name", { exact: true }).fill("E2E spectral card");
  await target.getByLabel("Values measured under").selectOption("D65");
  await target.getByLabel("Rows").fill(String(ROWS));
  await target.getByLabel("Columns").fill(String(COLUMNS));
  await target.getByLabel("Source of the values").fill("CIE 018:2019 tables");
  await target.getByLabel(/^Patches/).fill(csv);
  await target.getByRole("button", { name: "Create target" }).click();
  await page.getByText(`Target “E2E spectral card” created with ${CARD.length} patches.`).waitFor();

  await page.reload();
  const draft = page.getByRole("form", { name: "New draft profile" });
  await draft.getByLabel("Name", { exact: true }).fill("E2E phone on the copy stand");
  await draft.getByLabel("Light source").fill("Daylight LED panel, diffuser");
  await draft.getByLabel("Camera", { exact: true }).fill("Phone, fixed exposure");
  const option = await draft.getByLabel("Calibration target").locator("option", { hasText: "E2E spectral card" }).getAttribute("value");
  await draft.getByLabel("Calibration target").selectOption(option!);
  await draft.getByLabel("Method").selectOption("auto");
  await draft.getByRole("button", { name: "Create draft profile" }).click();
  // Creating a draft lands on it, ready to be fitted.
  await page.waitForURL(/\/lighting\/profiles\/lp_[^?]*\?created=1/);
  await page.getByTestId("draft-created").waitFor();
  await expect(page.getByTestId("profile-status").innerText()).resolves.toMatch(/Draft/);

  await page.getByTestId("card-photo-input").setInputFiles(card.file);
  const corner = page.getByTestId("grid-corner-0");
  await corner.waitFor();
  // Drag the top-left handle towards the card's corner, then set every corner exactly.
  await page.getByTestId("card-grid").scrollIntoViewIfNeeded();
  const box = (await page.getByTestId("card-grid").boundingBox())!;
  const c0 = (await corner.boundingBox())!;
  await page.mouse.move(c0.x + c0.width / 2, c0.y + c0.height / 2);
  await page.mouse.down();
  await page.mouse.move(box.x + (GAP / card.width) * box.width, box.y + (GAP / card.height) * box.height, { steps: 5 });
  await page.mouse.up();
  await expect.poll(async () => Number(await page.getByLabel("top left x").inputValue())).toBeLessThan(GAP + 8);
  const right = GAP + COLUMNS * (SIZE + GAP) - GAP;
  const bottom = GAP + ROWS * (SIZE + GAP) - GAP;
  const corners: [string, number, number][] = [["top left", GAP, GAP], ["top right", right, GAP], ["bottom right", right, bottom], ["bottom left", GAP, bottom]];
  for (const [name, x, y] of corners) {
    await page.getByLabel(`${name} x`).fill(String(x));
    await page.getByLabel(`${name} y`).fill(String(y));
  }
  await page.getByRole("button", { name: "Sample the patches and fit" }).click();
  await page.getByText(/^Fitted with/).waitFor();
  const residuals = page.getByTestId("residuals");
  await residuals.waitFor();
  await expect(residuals.locator("tbody tr").count()).resolves.toBe(CARD.length);
  const loo = await page.getByTestId("loo-summary").innerText();
  const mean = Number(/mean ([\d.]+)/.exec(loo)![1]);
  expect(mean).toBeLessThan(2);
  // "auto" shows every method tried, with the leave-one-out mean over the card's hull (extrapolation)
  // beside the plain one, and why it kept the method it used.
  const tried = page.getByTestId("methods-tried");
  await expect(tried.locator("tbody tr").count()).resolves.toBe(3);
  await expect(tried.locator("thead").innerText()).resolves.toMatch(/hull leave-one-out mean/);
  const used = (await tried.locator("tbody tr", { hasText: "(used)" }).innerText()).trim();
  expect(used).toMatch(/\d+\.\d\d$/);
  await expect(page.getByTestId("method-selection").innerText()).resolves.toMatch(/hull/);

  await page.getByRole("button", { name: "Approve this profile" }).click();
  // Once approved, the draft-only sections (fit, approve, edit) leave the page and the badge says so.
  await expect.poll(() => page.getByTestId("profile-status").innerText(), { timeout: 30_000 }).toMatch(/Approved/);
  await page.reload();
  await expect(page.getByTestId("profile-status").innerText()).resolves.toMatch(/Approved/);
  await expect(page.getByTestId("profile-state").innerText()).resolves.toBe("approved");
  await admin.signOut();

  // The chemist picks the new profile on the bench (the expired demo profile is not offered).
  const chemist = new SignInPage(page, base);
  await chemist.signIn("chemist@demo.test");
  await page.goto(`${base}/bench`);
  const offered = await page.getByLabel("Lighting profile for these photos").locator("option").allInnerTexts();
  expect(offered).toContain("E2E phone on the copy stand");
  expect(offered.some((o) => o.startsWith("Light box North"))).toBe(false);
  const profileValue = await page.getByLabel("Lighting profile for these photos").locator("option", { hasText: "E2E phone on the copy stand" }).getAttribute("value");
  await page.getByLabel("Lighting profile for these photos").selectOption(profileValue!);
  const bench = await photo(22, "bench-e2e.png");
  await page.locator('[data-testid="photo-dropzone"][data-ready="true"]').waitFor();
  await page.getByTestId("photo-input").setInputFiles(bench.file);
  const item = page.locator('[data-testid="upload-item"][data-status="done"]', { hasText: "bench-e2e.png" });
  await item.waitFor();
  await item.getByRole("link", { name: "Mark vials" }).click();
  await page.waitForURL(/\/bench\/photos\/ph_/);
  const marking = new MarkingPage(page, { width: bench.width, height: bench.height });
  await marking.canvas().waitFor();
  await marking.chooseNewRegion("Vial", "Rectangle");
  const [vx, vy, vw, vh] = bench.boxes[CARD.length];
  await marking.draw({ x: vx + 8, y: vy + 8, w: vw - 16, h: vh - 16 });
  // Vials are rows of the rack table; the ± column fills in once the live measurement is back.
  const row = marking.row("Vial 1");
  const u = row.getByTestId("live-uncertainty");
  await expect.poll(() => u.innerText(), { timeout: 30_000 }).toMatch(/± \d+\.\d/);
  // The live colour is within 1.5 ΔE00 of the vial's true colour (here ΔE*ab, a looser check).
  const lab = /L\*\s+(-?[\d.]+)\s+a\*\s+(-?[\d.]+)\s+b\*\s+(-?[\d.]+)/.exec(await row.getByTestId("live-lab").innerText())!;
  const truth = spectrumLab(VIALS[0].transmittance, "D65");
  expect(Math.hypot(+lab[1] - truth[0], +lab[2] - truth[1], +lab[3] - truth[2])).toBeLessThan(3);
  await chemist.signOut();
  expect(errors).toEqual([]);
  await page.close();
  // Two people's work, a fit with leave-one-out and two uploads on a shared machine: allow 6 minutes.
}, 360_000);
