/**
 * `calibrate` and `measure --calibration` run as a lab script would (a child process), against the
 * contract in ../shared/CONTRACT.md. The card photo is a PNG rendered through a synthetic camera that
 * is not sRGB (cross-talk, a warm light, under-exposure, a phone-like S-curve, 8-bit noise); the
 * card's and the vials' true colours come from invented smooth spectra and the CIE tables in
 * tests/fixtures (tests/support/spectral-card.ts), not from the code under test.
 */
import { execFile } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import { deltaE00 } from "@/lib/color/difference";
import { renderSwatches, SYNTHETIC_CAMERAS, type SyntheticCamera } from "@/lib/color/synthetic-camera";
import type { Lab } from "@/lib/color/types";
import { CARD, GREYS, sceneXyzD65, spectrumLab, VIALS } from "../support/spectral-card";

const ROOT = process.cwd();
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-calibrate-"));
const file = (name: string) => path.join(dir, name);

type Run = { code: number; stdout: string; stderr: string };
function cli(args: string[]): Promise<Run> {
  return new Promise((resolve) => {
    execFile(process.execPath, ["--import", "tsx", path.join(ROOT, "lib/cli/main.ts"), ...args], { cwd: ROOT, env: { ...process.env, NODE_NO_WARNINGS: "1" } }, (error, stdout, stderr) => {
      resolve({ code: error ? ((error as { code?: number }).code ?? 1) : 0, stdout, stderr });
    });
  });
}

function expectRefusal(run: Run, pattern: RegExp) {
  expect(run.code).not.toBe(0);
  expect(run.stdout).toBe("");
  const lines = run.stderr.trim().split("\n");
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(/^[A-Z-"].*[.]$/);
  expect(lines[0]).toMatch(pattern);
}

const SIZE = 48;
const INSET = 6;
type Box = [number, number, number, number];
let cardBoxes: Box[] = [];
let vialBoxes: Box[] = [];
const cardLabD65 = CARD.map((p) => spectrumLab(p.reflectance, "D65") as Lab);
const cardLabD50 = CARD.map((p) => spectrumLab(p.reflectance, "D50") as Lab);
const vialLabD65 = VIALS.map((v) => spectrumLab(v.transmittance, "D65") as Lab);

async function renderPng(camera: SyntheticCamera, light: "D65" | "D50", name: string): Promise<string> {
  const swatches = [...CARD.map((p) => sceneXyzD65(p.reflectance, light)), ...VIALS.map((v) => sceneXyzD65(v.transmittance, light))];
  const r = renderSwatches(camera, { swatches, columns: 6, size: SIZE, gap: 10 }, 11);
  const boxes = r.boxes.map(([x, y, w, h]) => [x + INSET, y + INSET, w - 2 * INSET, h - 2 * INSET] as Box);
  cardBoxes = boxes.slice(0, CARD.length);
  vialBoxes = boxes.slice(CARD.length);
  fs.writeFileSync(file(name), await sharp(Buffer.from(r.data), { raw: { width: r.width, height: r.height, channels: 3 } }).png().toBuffer());
  return file(name);
}

const patchArgs = (labs: Lab[], indices = labs.map((_, i) => i)) =>
  indices.flatMap((i) => ["--patch", `${cardBoxes[i].join(",")}=${labs[i].map((v) => v.toFixed(3)).join(",")}`]);

let cardPng = "";
let overexposedPng = "";

beforeAll(async () => {
  overexposedPng = await renderPng({ ...SYNTHETIC_CAMERAS.warmPhone, exposure: 1.6 }, "D65", "over.png");
  cardPng = await renderPng(SYNTHETIC_CAMERAS.warmPhone, "D65", "card.png");
});

describe("calibrate then measure --calibration on a non-sRGB camera", () => {
  it("prints a calibration with per-patch training and leave-one-out residuals, and measures hold-out vials within 1.5 ΔE00", async () => {
    const cal = await cli(["calibrate", cardPng, ...patchArgs(cardLabD65)]);
    expect(cal.stderr).toBe("");
    expect(cal.code).toBe(0);
    const calibration = JSON.parse(cal.stdout);
    expect(calibration.method).toBe("matrix-3x3");
    expect(calibration.whitePoint).toBe("D65");
    expect(calibration.residuals).toHaveLength(CARD.length);
    calibration.residuals.forEach((r: { patch: number; deltaE00: number; looDeltaE00: number }, i: number) => {
      expect(r.patch).toBe(i + 1);
      expect(r.deltaE00).toBeGreaterThanOrEqual(0);
      expect(r.looDeltaE00).toBeGreaterThanOrEqual(0);
    });
    expect(calibration.meanDeltaE00).toBeLessThan(1);
    expect(calibration.maxDeltaE00).toBeGreaterThanOrEqual(calibration.meanDeltaE00);
    expect(calibration.toneCurve).not.toBeNull();
    fs.writeFileSync(file("cal.json"), cal.stdout);

    const measured = await cli(["measure", cardPng, ...vialBoxes.flatMap((b) => ["--roi", b.join(",")]), "--calibration", file("cal.json")]);
    expect(measured.stderr).toBe("");
    expect(measured.code).toBe(0);
    const { measurements } = JSON.parse(measured.stdout);
    const errors = measurements.map((m: { lab: Lab }, i: number) => deltaE00(m.lab, vialLabD65[i]));
    for (const e of errors) expect(e).toBeLessThan(1.5);
    for (const m of measurements) {
      expect(m.uncertaintyDeltaE00).toBeGreaterThan(0);
      expect(m.uncertaintyDeltaE00).toBeLessThan(5);
      expect(m.uncertaintyIncludesCalibration).toBe(true);
      expect(m.flags).not.toContain("uncorrected");
    }
    // The same vials read as if the camera were sRGB, with only the white patch to correct them:
    // far off (this is what the calibration is for, and why the check above can fail).
    const white = CARD.length - GREYS.length;
    const plain = await cli(["measure", cardPng, ...vialBoxes.flatMap((b) => ["--roi", b.join(",")]), "--white", cardBoxes[white].join(","), "--white-lab", cardLabD65[white].join(",")]);
    const plainErrors = JSON.parse(plain.stdout).measurements.map((m: { lab: Lab }, i: number) => deltaE00(m.lab, vialLabD65[i]));
    expect(plainErrors.reduce((a: number, b: number) => a + b, 0) / plainErrors.length).toBeGreaterThan(3);
    expect(JSON.parse(plain.stdout).measurements[0].flags).toContain("white-reference-only");
  });

  it("reads D50 reference values as D50 (read as D65 they would be ≥ 1 ΔE00 off on the vials)", async () => {
    const d50 = await renderPng(SYNTHETIC_CAMERAS.warmPhone, "D50", "card-d50.png");
    const cal = await cli(["calibrate", d50, ...patchArgs(cardLabD50), "--white-point", "D50"]);
    expect(cal.code).toBe(0);
    expect(JSON.parse(cal.stdout).whitePoint).toBe("D50");
    fs.writeFileSync(file("cal50.json"), cal.stdout);
    const vialLabD50 = VIALS.map((v) => spectrumLab(v.transmittance, "D50") as Lab);
    const rois = vialBoxes.flatMap((b) => ["--roi", b.join(",")]);
    const m = JSON.parse((await cli(["measure", d50, ...rois, "--calibration", file("cal50.json"), "--white-point", "D50"])).stdout).measurements;
    m.forEach((x: { lab: Lab }, i: number) => expect(deltaE00(x.lab, vialLabD50[i])).toBeLessThan(1.5));
    const wrong = await cli(["calibrate", d50, ...patchArgs(cardLabD50)]);
    fs.writeFileSync(file("wrong.json"), wrong.stdout);
    const w = JSON.parse((await cli(["measure", d50, ...rois, "--calibration", file("wrong.json"), "--white-point", "D50"])).stdout).measurements;
    const meanWrong = w.reduce((s: number, x: { lab: Lab }, i: number) => s + deltaE00(x.lab, vialLabD50[i]), 0) / w.length;
    expect(meanWrong).toBeGreaterThan(1);
    cardPng = await renderPng(SYNTHETIC_CAMERAS.warmPhone, "D65", "card.png");
  });
});

describe("calibrate refuses bad input as the contract says", () => {
  it("too few patches for the method", async () => {
    expectRefusal(await cli(["calibrate", cardPng, ...patchArgs(cardLabD65, [0, 1, 2])]), /at least 4 patches/);
    expectRefusal(await cli(["calibrate", cardPng, ...patchArgs(cardLabD65, [0, 1, 2, 3, 4, 5, 18, 19, 20]), "--method", "root-polynomial-2"]), /at least 18 patches/);
  });
  it("greys only for a matrix", async () => {
    expectRefusal(await cli(["calibrate", cardPng, ...patchArgs(cardLabD65, [18, 19, 20, 21, 22, 23])]), /Grey patches alone/);
  });
  it("clipped patches", async () => {
    expectRefusal(await cli(["calibrate", overexposedPng, ...patchArgs(cardLabD65)]), /clipped/);
  });
  it("a malformed --patch, an unknown method, a bad white point, no patches", async () => {
    expectRefusal(await cli(["calibrate", cardPng, "--patch", "1,2,3,4"]), /x,y,w,h=L,a,b/);
    expectRefusal(await cli(["calibrate", cardPng, "--patch", "1,2,3,4=50,a,0"]), /3 comma-separated numbers/);
    expectRefusal(await cli(["calibrate", cardPng, "--patch", "1,2,0,4=50,0,0"]), /empty/);
    expectRefusal(await cli(["calibrate", cardPng, ...patchArgs(cardLabD65), "--method", "cubic"]), /--method must be/);
    expectRefusal(await cli(["calibrate", cardPng, ...patchArgs(cardLabD65), "--white-point", "D55"]), /--white-point must be/);
    expectRefusal(await cli(["calibrate", cardPng]), /--patch/);
    expectRefusal(await cli(["calibrate", cardPng, "--patch", "100000,0,10,10=50,0,0"]), /outside/);
  });
  it("measure refuses a missing, non-JSON or foreign calibration file", async () => {
    const roi = ["--roi", vialBoxes[0].join(",")];
    expectRefusal(await cli(["measure", cardPng, ...roi, "--calibration", file("nope.json")]), /does not exist/);
    fs.writeFileSync(file("junk.json"), "not json");
    expectRefusal(await cli(["measure", cardPng, ...roi, "--calibration", file("junk.json")]), /not JSON/);
    fs.writeFileSync(file("other.json"), JSON.stringify({ method: "matrix-3x3", matrix: [1, 2, 3] }));
    expectRefusal(await cli(["measure", cardPng, ...roi, "--calibration", file("other.json")]), /not a Solvatlas calibration/);
  });
});
