/**
 * A lab day at the bench in Chromium: a chemist marks an eight-vial rack, gives it a saved solvent
 * panel and one dye in one step each, sees the vial painted with a wrong colour flagged against the
 * earlier accepted replicates (rule: lib/bench/replicates.ts, common practice), and saves; the review
 * card shows the flag with the earlier colours; the reviewer sees the saved regions on the photo and
 * accepts them all. A CSV import with a bad row names its line and column and stores nothing.
 *
 * The vials are painted with the sRGB (IEC 61966-2-1, tests/fixtures) equivalent of the dye's accepted
 * colours, so a correct measurement agrees with them; the white tile gives the light correction.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import sharp from "sharp";
import { expect, inject, it } from "vitest";
import { useBrowser, watchConsole } from "./browser";
import { MarkingPage } from "./pages/marking-page";
import { SignInPage } from "./pages/sign-in-page";
import { deltaE76, labOf8, linearOfLab, srgbEncode } from "../support/srgb-reference";

const base = inject("baseUrl");
const SHOTS = path.join(process.cwd(), "tests", "e2e", "__screenshots__");
const browser = useBrowser();

const LADDER = ["Water", "Methanol", "Ethanol", "Acetonitrile", "Dimethyl sulfoxide", "Acetone", "Dichloromethane", "Toluene"];
const RACK8 = { w: 1400, h: 420, vial: { x0: 40, step: 150, y: 110, w: 100, h: 200 }, white: { x: 1250, y: 130, w: 120, h: 160 } };
const WHITE: [number, number, number] = [235, 235, 235];

type Row = { dye: { id: string; code: string }; lab: number[]; condition: { solvent: string; acidBase: string; pH: number | null; concentrationUmolL: number | null } };

const to8 = (lab: number[]) => linearOfLab(lab).map((v) => Math.round(255 * srgbEncode(v)));
const inGamut = (lab: number[]) => linearOfLab(lab).every((v) => v > 0.005 && v < 0.97);
const GREY = [128, 128, 128];
/** In-gamut, unclipped colours; the wrong vial gets the one farthest from the dye's accepted colour. */
const WRONG_CHOICES = [GREY, [60, 140, 200], [200, 90, 60], [90, 170, 90], [210, 200, 80]];

async function rack8(colours: number[][]): Promise<Buffer> {
  const { w, h, vial, white } = RACK8;
  const px = Buffer.alloc(w * h * 3, 24);
  const paint = (x0: number, y0: number, ww: number, hh: number, c: number[]) => {
    for (let y = y0; y < y0 + hh; y++) for (let x = x0; x < x0 + ww; x++) px.set(c, (y * w + x) * 3);
  };
  colours.forEach((c, i) => paint(vial.x0 + i * vial.step, vial.y, vial.w, vial.h, c));
  paint(white.x, white.y, white.w, white.h, WHITE);
  return sharp(px, { raw: { width: w, height: h, channels: 3 } }).png().toBuffer();
}

it("a chemist marks an eight-vial rack with a saved panel and one dye, a disagreeing replicate is flagged on the bench and in review, the reviewer sees the regions and accepts all", async () => {
  await browser().clearCookies();
  const page = await browser().newPage();
  const errors = watchConsole(page);
  const chemist = new SignInPage(page, base);
  await chemist.signIn("chemist@demo.test");

  // A demo dye with accepted colours in the ladder's conditions (neutral, 20 µmol/L; water pH 7), at least
  // four of them paintable in sRGB: those vials are painted with their colour, except the first, painted
  // wrong on purpose. The other vials are painted grey (they may disagree; nothing is asserted of them).
  const dyeList = (await (await page.request.get(`${base}/api/dyes`)).json()).dyes as { id: string; code: string }[];
  let chosen: { code: string; mean: (number[] | null)[]; paintable: number[] } | null = null;
  for (const d of dyeList) {
    const rows = (await (await page.request.get(`${base}/api/measurements?dyeId=${d.id}`)).json()).measurements as Row[];
    const mean = LADDER.map((s) => {
      const labs = rows.filter((r) => r.condition.solvent === s && r.condition.acidBase === "neutral" && r.condition.concentrationUmolL === 20 && r.condition.pH === (s === "Water" ? 7 : null)).map((r) => r.lab);
      return labs.length ? [0, 1, 2].map((k) => labs.reduce((t, l) => t + l[k], 0) / labs.length) : null;
    });
    const paintable = mean.map((m, i) => (m && inGamut(m) ? i : -1)).filter((i) => i >= 0);
    if (paintable.length >= 4) {
      chosen = { code: d.code, mean, paintable };
      break;
    }
  }
  expect(chosen, "a demo dye measured in the ladder's solvents").not.toBeNull();
  const WRONG = chosen!.paintable[0];
  const agreeing = chosen!.paintable.slice(1);
  const colours = chosen!.mean.map((lab, i) =>
    i === WRONG ? WRONG_CHOICES.reduce((far, c) => (deltaE76(labOf8(c), lab!) > deltaE76(labOf8(far), lab!) ? c : far)) : agreeing.includes(i) ? to8(lab!) : GREY,
  );
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-rack8-")), "rack8-e2e.png");
  fs.writeFileSync(file, await rack8(colours));

  await page.goto(`${base}/bench`);
  await page.locator('[data-testid="photo-dropzone"][data-ready="true"]').waitFor();
  await page.getByTestId("photo-input").setInputFiles(file);
  const item = page.locator('[data-testid="upload-item"][data-status="done"]', { hasText: "rack8-e2e.png" });
  await item.waitFor();
  await item.getByRole("link", { name: "Mark vials" }).click();
  await page.waitForURL(/\/bench\/photos\/ph_/);
  const photoId = page.url().split("/").pop()!;

  const marking = new MarkingPage(page, { width: RACK8.w, height: RACK8.h });
  await marking.canvas().waitFor();
  await marking.chooseNewRegion("Vial", "Rectangle");
  const { vial, white } = RACK8;
  for (let i = 0; i < 8; i++) await marking.draw({ x: vial.x0 + i * vial.step + 15, y: vial.y + 20, w: vial.w - 30, h: vial.h - 40 });
  // Drawn regions land where the pointer went (no page scroll on press): within 3 photo px.
  const first = await page.getByTestId("region").first().locator("rect").first().evaluate((r) => [Number(r.getAttribute("x")), Number(r.getAttribute("y"))]);
  expect(Math.abs(first[0] - (vial.x0 + 15))).toBeLessThan(4);
  expect(Math.abs(first[1] - (vial.y + 20))).toBeLessThan(4);
  await marking.chooseNewRegion("Reference", "Ellipse");
  await marking.draw({ x: white.x + 20, y: white.y + 20, w: white.w - 40, h: white.h - 40 });
  const wl = labOf8(WHITE);
  await page.getByLabel("Known L* of Reference 1").fill(wl[0].toFixed(3));
  await page.getByLabel("Known a* of Reference 1").fill(wl[1].toFixed(3));
  await page.getByLabel("Known b* of Reference 1").fill(wl[2].toFixed(3));

  // One step each: the saved panel, then the same dye for every vial.
  await page.getByLabel("Solvent panel (left to right)").selectOption({ label: "Polarity ladder, 8 vials (8 solvents)" });
  await page.getByRole("button", { name: "Apply panel" }).click();
  await marking.pickSameDye(chosen!.code);
  for (let i = 0; i < 8; i++) {
    const select = page.getByLabel(`Solvent in Vial ${i + 1}`);
    await expect.poll(async () => select.evaluate((s: HTMLSelectElement) => s.selectedOptions[0]?.textContent ?? "")).toMatch(new RegExp(`^${LADDER[i]} — `));
  }

  // The wrong vial is flagged live, the others agree with their earlier replicates. Read once the editor has
  // settled: until then the flags shown may belong to colours measured before the reference was filled in.
  await marking.settled();
  const rows = page.getByTestId("vial-row");
  const disagreeing = async () => rows.evaluateAll((all) => all.filter((r) => (r as HTMLElement).dataset.flags?.includes("disagrees-with-replicates")).map((r) => (r as HTMLElement).dataset.label));
  const flaggedLabels = await disagreeing();
  expect(flaggedLabels).toContain(`Vial ${WRONG + 1}`);
  for (const i of agreeing) expect(flaggedLabels).not.toContain(`Vial ${i + 1}`);
  const flaggedOnBench = flaggedLabels.length;
  await expect(marking.row(`Vial ${WRONG + 1}`).getByTestId("replicate-check").innerText()).resolves.toMatch(/Disagrees with \d+ earlier accepted colour/);

  // Every flagged vial needs its reason; then the rack saves in one go.
  for (let i = 0; i < 8; i++) {
    const reason = page.getByLabel(`Why keep this flagged measurement? (Vial ${i + 1})`);
    if (await reason.count()) await reason.fill(i === WRONG ? "Deliberately wrong vial for the check" : "Kept: see the flag");
  }
  // The rack table fits beside the photo at common laptop widths: no sideways scroll, and every flag
  // reads on one line (a squeezed Flags column broke "≠ replicates" over two or three lines).
  for (const [width, height] of [[1440, 900], [1280, 800]]) {
    await page.setViewportSize({ width, height });
    await marking.settled();
    const table = page.getByTestId("rack-table");
    await table.scrollIntoViewIfNeeded();
    const layout = await table.evaluate((t) => {
      const box = t.parentElement!;
      const flagsHeader = [...t.querySelectorAll("th")].find((th) => th.textContent === "Flags")!;
      const flags = [...t.querySelectorAll('[data-testid="flag"]')].map((f) => ({ text: f.textContent, lines: Math.round(f.getBoundingClientRect().height / parseFloat(getComputedStyle(f.firstElementChild!).lineHeight)) }));
      return { overflow: box.scrollWidth - box.clientWidth, flagsWidth: flagsHeader.getBoundingClientRect().width, flags };
    });
    fs.mkdirSync(SHOTS, { recursive: true });
    // What the chemist sees: the photo (sticky) beside the table, scrolled to the rows.
    await page.screenshot({ path: path.join(SHOTS, `bench-editor-rack8-${width}.png`) });
    expect(layout.overflow, `sideways scroll at ${width} px`).toBeLessThanOrEqual(1);
    expect(layout.flags.length).toBeGreaterThan(0);
    for (const f of layout.flags) expect(f.lines, `“${f.text}” at ${width} px (Flags column ${Math.round(layout.flagsWidth)} px)`).toBeLessThanOrEqual(1);
  }
  await page.setViewportSize({ width: 1280, height: 860 });

  await page.getByRole("button", { name: "Save 8 measurements" }).click();
  await page.getByRole("status").filter({ hasText: "Saved 8 measurements" }).waitFor({ timeout: 30_000 });
  // After saving, the editor measures the references it kept; sign out only once that answer is in.
  await marking.settled();
  await chemist.signOut();

  // The reviewer: the regions on the photo, the flag with the earlier colours, accept all.
  const admin = new SignInPage(page, base);
  await admin.signIn("admin@demo.test");
  await page.goto(`${base}/review?photoId=${photoId}`);
  await expect(page.getByTestId("saved-region").count()).resolves.toBe(8);
  const flagged = page.getByTestId("review-item").filter({ has: page.locator('[data-testid="replicate-compare"][data-disagrees="true"]') });
  await expect(flagged.count()).resolves.toBe(flaggedOnBench);
  await expect(flagged.getByRole("img", { name: /Earlier accepted/ }).count()).resolves.toBeGreaterThan(0);
  const accept = page.getByTestId("accept-photo");
  await accept.getByRole("checkbox").check();
  await accept.getByRole("button", { name: "Accept all 8 from this photo" }).click();
  await page.getByText("Accepted 8 measurements from this photo.").waitFor();
  const res = await page.request.get(`${base}/api/measurements?state=accepted&photoId=${photoId}`);
  expect((await res.json()).measurements).toHaveLength(8);
  await admin.signOut();
  expect(errors.join("\n")).toBe("");
  await page.close();
}, 240_000);

it("a CSV import with a bad row shows its line and column and stores nothing", async () => {
  await browser().clearCookies();
  const page = await browser().newPage();
  const signIn = new SignInPage(page, base);
  await signIn.signIn("chemist@demo.test");
  const dye = ((await (await page.request.get(`${base}/api/dyes`)).json()).dyes as { code: string }[])[0].code;
  const csv = ["dye,solvent,L,a,b,white_point,observer,instrument", `${dye},Methanol,55.2,10.1,-20.3,D65,2,e2e import reader`, `${dye},Toluene,5x,10,-20,D65,2,e2e import reader`].join("\n");
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-csv-")), "colours.csv");
  fs.writeFileSync(file, csv);
  await page.goto(`${base}/bench/import`);
  await page.getByLabel("colours measured with an instrument (CIELAB)").check();
  await page.getByTestId("csv-file").setInputFiles(file);
  await page.getByRole("button", { name: "Check the file" }).click();
  const problem = page.getByTestId("import-problem");
  await problem.first().waitFor();
  await expect(problem.count()).resolves.toBe(1);
  await expect(problem.first().innerText()).resolves.toMatch(/^3\s+L\s+L\* “5x” is not a number\./);
  await expect(page.getByRole("button", { name: "Import all 2 rows" }).isDisabled()).resolves.toBe(true);
  const stored = (await (await page.request.get(`${base}/api/measurements?state=any`)).json()).measurements as { instrument: string | null }[];
  expect(stored.filter((m) => m.instrument === "e2e import reader")).toHaveLength(0);
  await signIn.signOut();
  await page.close();
}, 120_000);
