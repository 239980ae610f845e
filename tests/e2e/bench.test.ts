/**
 * The chemist's day in Chromium: upload a generated rack photo, mark four vials and the white
 * reference, see the live colours, save; the admin accepts the four. The formulator cannot reach
 * the bench.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { expect, inject, it } from "vitest";
import { useBrowser, watchConsole } from "./browser";
import { MarkingPage } from "./pages/marking-page";
import { SignInPage } from "./pages/sign-in-page";
import { RACK, rackPhoto, type Rgb8 } from "../support/photos";
import { deltaE76, labOf8 } from "../support/srgb-reference";

const base = inject("baseUrl");
const browser = useBrowser();

const VIALS: Rgb8[] = [
  [200, 50, 110],
  [50, 110, 200],
  [225, 185, 50],
  [120, 60, 170],
];
const WHITE: Rgb8 = [235, 235, 235];
const SOLVENTS = ["Methanol", "Acetonitrile", "Toluene", "Dimethyl sulfoxide"];

it("a chemist uploads a rack photo, marks four vials and the reference, sees live colours and saves; the admin accepts them", async () => {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-rack-")), "rack-e2e.png");
  fs.writeFileSync(file, await rackPhoto(VIALS, { white: WHITE, format: "png" }));

  await browser().clearCookies();
  const page = await browser().newPage();
  const errors = watchConsole(page);
  const chemist = new SignInPage(page, base);
  await chemist.signIn("chemist@demo.test");
  await page.goto(`${base}/bench`);
  await page.locator('[data-testid="photo-dropzone"][data-ready="true"]').waitFor();
  await page.getByTestId("photo-input").setInputFiles(file);
  const item = page.locator('[data-testid="upload-item"][data-status="done"]', { hasText: "rack-e2e.png" });
  await item.waitFor();
  await item.getByRole("link", { name: "Mark vials" }).click();
  await page.waitForURL(/\/bench\/photos\/ph_/);

  const marking = new MarkingPage(page, { width: RACK.w, height: RACK.h });
  await marking.canvas().waitFor();
  await marking.chooseNewRegion("Vial", "Rectangle");
  for (let i = 0; i < 4; i++) {
    await marking.draw({ x: RACK.vial.x0 + i * RACK.vial.step + 18, y: RACK.vial.y + 25, w: RACK.vial.w - 36, h: RACK.vial.h - 50 });
  }
  await marking.chooseNewRegion("Reference", "Ellipse");
  await marking.draw({ x: RACK.white.x + 25, y: RACK.white.y + 25, w: RACK.white.w - 50, h: RACK.white.h - 50 });
  expect(await page.getByTestId("region").count()).toBe(5);

  const white = labOf8(WHITE);
  const ref = marking.card("Reference 1");
  await ref.getByLabel("Known L* of Reference 1").fill(white[0].toFixed(3));
  await ref.getByLabel("Known a* of Reference 1").fill(white[1].toFixed(3));
  await ref.getByLabel("Known b* of Reference 1").fill(white[2].toFixed(3));

  await marking.pickSameDye("-107");
  for (let i = 0; i < 4; i++) {
    const option = await page.getByLabel(`Solvent in Vial ${i + 1}`).locator("option", { hasText: new RegExp(`^${SOLVENTS[i]} — `) }).getAttribute("value");
    await page.getByLabel(`Solvent in Vial ${i + 1}`).selectOption(option!);
  }
  await page.getByLabel("Acid or base in Vial 1").selectOption("acid");
  await marking.row("Vial 1").getByRole("button", { name: /pH, additive/ }).click();
  await page.getByLabel("pH in Vial 1").fill("3");

  // Live colours: each vial's L*, a*, b* is within 1 ΔE*ab of the sRGB/CIELAB value of its paint.
  for (let i = 0; i < 4; i++) {
    const lab = marking.row(`Vial ${i + 1}`).getByTestId("live-lab");
    await lab.waitFor();
    await expect.poll(async () => {
      const m = /L\* (-?[\d.]+)\s+a\* (-?[\d.]+)\s+b\* (-?[\d.]+)/.exec(await lab.innerText());
      return m ? deltaE76([+m[1], +m[2], +m[3]], labOf8(VIALS[i])) : 99;
    }, { timeout: 15_000 }).toBeLessThan(1);
  }
  // The solvents in use bring their cautions.
  await expect(page.getByRole("complementary", { name: "Safety" }).innerText()).resolves.toMatch(/Methanol:.*Toxic/);

  // Save only once the live colours belong to the inputs as they are now (the editor says so with data-busy).
  await marking.settled();
  await page.getByRole("button", { name: "Save 4 measurements" }).click();
  await page.getByRole("status").filter({ hasText: "Saved 4 measurements" }).waitFor();
  await expect(page.getByTestId("saved-measurements").locator("li").count()).resolves.toBe(4);
  const photoUrl = page.url();
  const photoId = photoUrl.split("/").pop()!;
  // No live check may still be in flight when the session ends (it would be answered 401).
  await marking.settled();
  await chemist.signOut();

  // The chemist's own measurements are not theirs to review; the admin accepts them.
  const admin = new SignInPage(page, base);
  await admin.signIn("admin@demo.test");
  await page.goto(`${base}/review?photoId=${photoId}`);
  const items = page.getByTestId("review-item");
  await expect(items.count()).resolves.toBe(4);
  for (let left = 4; left > 0; left--) {
    await items.filter({ has: page.getByRole("button", { name: "Accept" }) }).first().getByRole("button", { name: "Accept" }).click();
    await expect.poll(() => items.filter({ has: page.getByRole("button", { name: "Accept" }) }).count(), { timeout: 20_000 }).toBe(left - 1);
  }
  const res = await page.request.get(`${base}/api/measurements?state=accepted`);
  const body = await res.json();
  const ours = body.measurements.filter((m: { photoId: string }) => m.photoId === photoId);
  expect(ours).toHaveLength(4);
  expect(ours.map((m: { condition: { solvent: string } }) => m.condition.solvent).sort()).toEqual([...SOLVENTS].sort());
  await admin.signOut();
  expect(errors).toEqual([]);
  await page.close();
});

it("the formulator cannot reach the bench, its upload or its live measurement", async () => {
  await browser().clearCookies();
  const page = await browser().newPage();
  const signIn = new SignInPage(page, base);
  await signIn.signIn("formulator@demo.test");
  await page.goto(`${base}/bench`);
  await expect(page.getByTestId("refused").innerText()).resolves.toMatch(/bench is for admins and chemists/i);
  await page.goto(`${base}/bench/photos/ph_demo_0001`);
  await expect(page.getByTestId("refused").innerText()).resolves.toMatch(/bench is for admins and chemists/i);
  const upload = await page.request.post(`${base}/api/photos`, { multipart: { file: { name: "x.png", mimeType: "image/png", buffer: await rackPhoto([[10, 200, 10]], { format: "png" }) } }, headers: { origin: base } });
  expect(upload.status()).toBe(403);
  // The measurements table is for every role.
  await page.goto(`${base}/measurements`);
  expect(await page.getByTestId("measurement-row").count()).toBeGreaterThan(10);
  await signIn.signOut();
  await page.close();
});

it("a demo photo uploaded under the profile that expired in May 2026 opens with no profile chosen and says why", async () => {
  await browser().clearCookies();
  const page = await browser().newPage();
  const errors = watchConsole(page);
  await new SignInPage(page, base).signIn("chemist@demo.test");
  // ph_demo_0001 is the demo's first rack, taken under "Light box North", valid until the end of May 2026.
  await page.goto(`${base}/bench/photos/ph_demo_0001`);
  const notice = page.getByTestId("stored-profile-gone");
  await expect(notice.innerText()).resolves.toMatch(/Light box North.*expired on 2026-05-3/s);
  await expect(page.getByLabel("Lighting profile of this photo").inputValue()).resolves.toBe("");
  expect(errors).toEqual([]);
  await page.close();
});
