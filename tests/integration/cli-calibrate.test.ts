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
import { beforeAll, describe, expect, it } from "vitest";
import { deltaE00 } from "@/lib/color/difference";
import { SYNTHETIC_CAMERAS, type SyntheticCamera } from "@/lib/color/synthetic-camera";
import type { Lab } from "@/lib/color/types";
import { cardPhoto } from "../support/camera";
import { CARD, GREYS, spectrumLab, VIALS } from "../support/spectral-card";

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

type Box = [number, number, number, number];
let cardBoxes: Box[] = [];
let vialBoxes: Box[] = [];
const cardLabD65 = CARD.map((p) => spectrumLab(p.reflectance, "D65") as Lab);
const cardLabD50 = CARD.map((p) => spectrumLab(p.reflectance, "D50") as Lab);
const vialLabD65 = VIALS.map((v) => spectrumLab(v.transmittance, "D65") as Lab);

async function renderPng(camera: SyntheticCamera, light: "D65" | "D50", name: string): Promise<string> {
  const photo = await cardPhoto({ camera, light, size: 48, gap: 10, inset: 6, seed: 11 });
  cardBoxes = photo.patches.map((p) => p.box);
  vialBoxes = photo.vials.map((v) => v.box);
  fs.writeFileSync(file(name), photo.file);
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
  }, 240_000);

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
  }, 300_000);
});

describe("calibrate refuses bad input as the contract says", () => {
  it("too few patches for the method", async () => {
    const [three, nine] = await Promise.all([
      cli(["calibrate", cardPng, ...patchArgs(cardLabD65, [0, 1, 2])]),
      cli(["calibrate", cardPng, ...patchArgs(cardLabD65, [0, 1, 2, 3, 4, 5, 18, 19, 20]), "--method", "root-polynomial-2"]),
    ]);
    expectRefusal(three, /at least 4 patches/);
    expectRefusal(nine, /at least 18 patches/);
  }, 240_000);
  it("greys only for a matrix; a patch region that straddles an edge", async () => {
    const straddling = [...cardBoxes[0]];
    straddling[0] += Math.round(straddling[2] / 2) + 6;
    const edge = ["--patch", `${straddling.join(",")}=${cardLabD65[0].join(",")}`, ...patchArgs(cardLabD65).slice(2)];
    const [greys, edgeRun] = await Promise.all([cli(["calibrate", cardPng, ...patchArgs(cardLabD65, [18, 19, 20, 21, 22, 23])]), cli(["calibrate", cardPng, ...edge])]);
    expectRefusal(greys, /Grey patches alone/);
    expectRefusal(edgeRun, /not one even colour/);
  }, 240_000);
  it("clipped patches", async () => {
    expectRefusal(await cli(["calibrate", overexposedPng, ...patchArgs(cardLabD65)]), /clipped/);
  });
  it("a malformed --patch, an unknown method, a bad white point, no patches", async () => {
    // Run side by side: each child process loads TypeScript, which is slow on a busy machine.
    const cases: [string[], RegExp][] = [
      [["--patch", "1,2,3,4"], /x,y,w,h=L,a,b/],
      [["--patch", "1,2,3,4=50,a,0"], /3 comma-separated numbers/],
      [["--patch", "1,2,0,4=50,0,0"], /empty/],
      [[...patchArgs(cardLabD65), "--method", "cubic"], /--method must be/],
      [[...patchArgs(cardLabD65), "--white-point", "D55"], /--white-point must be/],
      [[], /--patch/],
      [["--patch", "100000,0,10,10=50,0,0"], /outside/],
    ];
    const runs = await Promise.all(cases.map(([args]) => cli(["calibrate", cardPng, ...args])));
    runs.forEach((run, i) => expectRefusal(run, cases[i][1]));
  }, 300_000);
  it("measure refuses a missing, non-JSON or foreign calibration file", async () => {
    const roi = ["--roi", vialBoxes[0].join(",")];
    fs.writeFileSync(file("junk.json"), "not json");
    fs.writeFileSync(file("other.json"), JSON.stringify({ method: "matrix-3x3", matrix: [1, 2, 3] }));
    const [missing, junk, other] = await Promise.all(["nope.json", "junk.json", "other.json"].map((f) => cli(["measure", cardPng, ...roi, "--calibration", file(f)])));
    expectRefusal(missing, /does not exist/);
    expectRefusal(junk, /not JSON/);
    expectRefusal(other, /not a Solvatlas calibration/);
  }, 240_000);
});
