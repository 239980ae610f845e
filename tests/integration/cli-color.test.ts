/**
 * The colour commands of the command line, run as a lab script would (a child process), against the
 * contract in ../shared/CONTRACT.md: JSON on stdout and nothing else; on bad input a non-zero exit,
 * nothing on stdout and one sentence on stderr.
 */
import { execFile } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import { labToLinearSrgb, linearSrgbToLab } from "@/lib/color/convert";
import { deltaE00 } from "@/lib/color/difference";
import { srgbEncode } from "@/lib/color/srgb";
import { indicatorForm, indicatorSeries, twoStepIndicatorSeries } from "../support/indicator-series";
import type { Lab } from "@/lib/color/types";

const ROOT = process.cwd();
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-cli-"));
const file = (name: string) => path.join(dir, name);

type Run = { code: number; stdout: string; stderr: string };
function cli(args: string[], viaNpm = false): Promise<Run> {
  const [cmd, argv] = viaNpm
    ? ["npm", ["run", "--silent", "cli", "--", ...args]]
    : [process.execPath, ["--import", "tsx", path.join(ROOT, "lib/cli/main.ts"), ...args]];
  return new Promise((resolve) => {
    execFile(cmd, argv, { cwd: ROOT, env: { ...process.env, NODE_NO_WARNINGS: "1" } }, (error, stdout, stderr) => {
      resolve({ code: error ? ((error as { code?: number }).code ?? 1) : 0, stdout, stderr });
    });
  });
}

/** Refused cleanly: non-zero exit, empty stdout, exactly one line on stderr that reads as a sentence. */
function expectRefusal(run: Run, pattern: RegExp) {
  expect(run.code).not.toBe(0);
  expect(run.stdout).toBe("");
  const lines = run.stderr.trim().split("\n");
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(/^[A-Z-].*[.]$/);
  expect(lines[0]).toMatch(pattern);
}

const SAMPLE: Lab = [48, 42, -30];
const GREY: Lab = [75, 0, 0];

beforeAll(async () => {
  // 240 × 120: a grey card (left) and a sample (right), both seen under a reddish light.
  const width = 240;
  const height = 120;
  const cast = [1.2, 1, 0.8];
  const raw = Buffer.alloc(width * height * 3);
  const grey = labToLinearSrgb(GREY, "D65");
  const sample = labToLinearSrgb(SAMPLE, "D65");
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const base = x < 120 ? grey : sample;
      for (let c = 0; c < 3; c++) raw[(y * width + x) * 3 + c] = Math.round(srgbEncode(Math.min(1, base[c] * cast[c])) * 255);
    }
  }
  const png = await sharp(raw, { raw: { width, height, channels: 3 } }).png().toBuffer();
  fs.writeFileSync(file("scene.png"), png);
  const jpeg = await sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality: 95 }).toBuffer();
  fs.writeFileSync(file("scene.jpg"), jpeg);
  fs.writeFileSync(file("truncated.jpg"), jpeg.subarray(0, Math.floor(jpeg.length / 2)));
  fs.writeFileSync(file("empty.jpg"), "");
  fs.writeFileSync(file("notes.jpg"), "these are lab notes, not a photo\n");
  fs.mkdirSync(file("folder.png"));
  fs.writeFileSync(file("band.csv"), "wavelength_nm,absorbance\n400,0.05\n450,0.2\n500,0.7\n540,1.0\n580,0.6\n650,0.1\n750,0.02\n");
  // A stronger near-UV band at 372 nm and the visible band at 520 nm (10 nm steps), and a UV tail alone.
  const twoBands = Array.from({ length: 51 }, (_, i) => 300 + 10 * i).map((w) => `${w},${(1.8 * Math.exp(-(((w - 372) / 25) ** 2)) + Math.exp(-(((w - 520) / 45) ** 2))).toFixed(5)}`);
  fs.writeFileSync(file("uv-and-visible.csv"), `wavelength_nm,absorbance\n${twoBands.join("\n")}\n`);
  const tail = Array.from({ length: 49 }, (_, i) => 300 + 10 * i).map((w) => `${w},${(2.5 * Math.exp(-(w - 300) / 30)).toFixed(5)}`);
  fs.writeFileSync(file("uv-tail.csv"), `wavelength_nm,absorbance\n${tail.join("\n")}\n`);
  fs.writeFileSync(file("comma.csv"), "wavelength_nm;absorbance\n400;0,05\n500;0,7\n");
  fs.writeFileSync(file("bad-number.csv"), "wavelength_nm,absorbance\n400,0.05\n500,n/a\n");
  fs.writeFileSync(file("empty.csv"), "");
  // A pH series of bromothymol blue (handbook pKa 7.30: Alberta Chemistry 30 Data Booklet, Ka 5.0e-8) generated
  // the physical way (log-normal bands mixed per wavelength, CIE summation; tests/support/indicator-series.ts).
  const truth = -Math.log10(5.0e-8);
  const rows = indicatorSeries(indicatorForm(432, 1.0), indicatorForm(617, 1.0), truth, [5, 5.5, 6, 6.5, 7, 7.25, 7.5, 8, 8.5, 9, 9.5], 0.2, 9).map((p) => [p.pH, ...p.lab].join(","));
  fs.writeFileSync(file("series.csv"), ["pH,L,a,b", ...rows].join("\n") + "\n");
  fs.writeFileSync(file("short-series.csv"), ["pH,L,a,b", ...rows.slice(0, 3)].join("\n") + "\n");
  fs.writeFileSync(file("binary.csv"), Buffer.from([0xff, 0xfe, 0x00, 0x81, 0x00]));
  // Thymol blue, two steps (same booklet: Ka1 2.2e-2, Ka2 6.3e-10; red → yellow → blue), three log-normal forms.
  const thymol = twoStepIndicatorSeries([indicatorForm(545, 1.0), indicatorForm(430, 1.0), indicatorForm(596, 1.0)], -Math.log10(2.2e-2), -Math.log10(6.3e-10), Array.from({ length: 16 }, (_, i) => 0.75 * i), 0.2, 5);
  fs.writeFileSync(file("thymol-blue.csv"), ["pH,L,a,b", ...thymol.map((p) => [p.pH, ...p.lab].join(","))].join("\n") + "\n");
});

describe("cli measure", () => {
  it("prints the contract's JSON through npm run --silent cli, in --roi order", async () => {
    const run = await cli(["measure", file("scene.png"), "--roi", "130,10,100,100", "--roi", "10,10,100,100"], true);
    expect(run.stderr).toBe("");
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(Object.keys(out)).toEqual(["measurements"]);
    expect(out.measurements).toHaveLength(2);
    const [m] = out.measurements;
    expect(Object.keys(m).sort()).toEqual(["flags", "hex", "lab", "lch", "pixels", "rejected", "roi", "spread", "uncertaintyDeltaE00", "uncertaintyIncludesCalibration", "uncertaintyLab"]);
    expect(m.spread).toBe(0);
    expect(m.roi).toEqual([130, 10, 100, 100]);
    expect(m.pixels).toBe(10000);
    expect(m.rejected).toBe(0);
    expect(m.hex).toMatch(/^#[0-9a-f]{6}$/);
    expect(m.lch[0]).toBeCloseTo(m.lab[0], 12);
    expect(m.lch[1]).toBeCloseTo(Math.hypot(m.lab[1], m.lab[2]), 9);
    expect(Array.isArray(m.flags)).toBe(true);
    expect(out.measurements[1].roi).toEqual([10, 10, 100, 100]);
  });

  it("corrects the light with --white/--white-lab (grey card of known Lab) to within ΔE00 0.5", async () => {
    const plain = JSON.parse((await cli(["measure", file("scene.png"), "--roi", "130,10,100,100"])).stdout);
    expect(deltaE00(plain.measurements[0].lab, SAMPLE)).toBeGreaterThan(3);
    const run = await cli(["measure", file("scene.png"), "--roi", "130,10,100,100", "--white", "10,10,100,100", "--white-lab", "75,0,0"]);
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(deltaE00(out.measurements[0].lab, SAMPLE)).toBeLessThan(0.5);
  });

  it("reports CIELAB D50 with --white-point D50", async () => {
    const d65 = JSON.parse((await cli(["measure", file("scene.jpg"), "--roi", "10,10,100,100", "--white", "10,10,100,100", "--white-lab", "75,0,0"])).stdout);
    const d50 = JSON.parse((await cli(["measure", file("scene.jpg"), "--roi", "10,10,100,100", "--white", "10,10,100,100", "--white-lab", "75,0,0", "--white-point", "D50"])).stdout);
    // A grey reference is grey in either white point: the corrected card reads back as 75, 0, 0.
    for (const out of [d65, d50]) {
      expect(out.measurements[0].lab[0]).toBeCloseTo(75, 6);
      expect(Math.hypot(out.measurements[0].lab[1], out.measurements[0].lab[2])).toBeLessThan(1e-6);
    }
  });

  it.each([
    [["measure", "/no/such/photo.jpg", "--roi", "0,0,10,10"], /does not exist/],
    [["measure", "empty.jpg", "--roi", "0,0,10,10"], /empty/],
    [["measure", "notes.jpg", "--roi", "0,0,10,10"], /not a JPEG, PNG, WebP or TIFF/],
    [["measure", "truncated.jpg", "--roi", "0,0,10,10"], /truncated or damaged/],
    [["measure", "folder.png", "--roi", "0,0,10,10"], /folder/],
    [["measure", "scene.png", "--roi", "200,10,100,100"], /outside the 240×120 image/],
    [["measure", "scene.png", "--roi", "10,10,0,10"], /empty/],
    [["measure", "scene.png", "--roi", "10,10,abc,10"], /4 comma-separated numbers/],
    [["measure", "scene.png", "--roi", "10,10,10"], /4 comma-separated numbers/],
    [["measure", "scene.png", "--roi", "1.5,10,10,10"], /whole non-negative/],
    [["measure", "scene.png"], /at least one region/],
    [["measure", "--roi", "0,0,10,10"], /Give the image file/],
    [["measure", "scene.png", "--roi", "0,0,10,10", "--white", "0,0,10,10"], /go together/],
    [["measure", "scene.png", "--roi", "0,0,10,10", "--white", "0,0,10,10", "--white-lab", "75,0"], /3 comma-separated numbers/],
    [["measure", "scene.png", "--roi", "0,0,10,10", "--white-point", "D93"], /D65 or D50/],
    [["measure", "scene.png", "--roi", "0,0,10,10", "--colour"], /Unknown option/],
    [["measure", "scene.png", "--roi", "-5,0,10,10"], /--roi needs a value/],
    [["measure", "scene.png", "--roi=-5,0,10,10"], /whole non-negative/],
    [["measure", "scene.png", "other.png", "--roi", "0,0,10,10"], /one image/],
    [["nonsense"], /Unknown command 'nonsense'; the commands are measure/],
  ])("refuses %j cleanly", async (args, pattern) => {
    const run = await cli(args.map((a, i) => (i === 1 && !a.startsWith("/") && !a.startsWith("--") ? file(a) : a)));
    expectRefusal(run, pattern);
  });
});

describe("cli spectrum", () => {
  it("prints xyz, lab, hex, λmax and E_T", async () => {
    const run = await cli(["spectrum", file("band.csv")], true);
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout);
    expect(Object.keys(out)).toEqual(["xyz", "lab", "hex", "lambdaMaxNm", "transitionEnergyKcalMol"]);
    expect(out.lambdaMaxNm).toBeGreaterThan(530);
    expect(out.lambdaMaxNm).toBeLessThan(550);
    expect(out.transitionEnergyKcalMol).toBeCloseTo(28591 / out.lambdaMaxNm, 9);
    expect(out.lab[1]).toBeGreaterThan(0);
  });

  it("λmax is the longest-wavelength visible band even when a UV band is stronger; a UV tail alone gives null", async () => {
    const two = JSON.parse((await cli(["spectrum", file("uv-and-visible.csv")])).stdout);
    expect(Math.abs(two.lambdaMaxNm - 520)).toBeLessThan(3);
    expect(two.transitionEnergyKcalMol).toBeCloseTo(28591 / two.lambdaMaxNm, 9);
    const run = await cli(["spectrum", file("uv-tail.csv")]);
    expect(run.code).toBe(0);
    const tail = JSON.parse(run.stdout);
    expect(tail.lambdaMaxNm).toBeNull();
    expect(tail.transitionEnergyKcalMol).toBeNull();
    expect(tail.lab[2]).toBeGreaterThan(0);
  });

  it("applies --scale (Beer–Lambert) and --illuminant", async () => {
    const one = JSON.parse((await cli(["spectrum", file("band.csv")])).stdout);
    const half = JSON.parse((await cli(["spectrum", file("band.csv"), "--scale", "0.5"])).stdout);
    const a = JSON.parse((await cli(["spectrum", file("band.csv"), "--illuminant", "A"])).stdout);
    expect(half.xyz[1]).toBeGreaterThan(one.xyz[1]);
    expect(half.lambdaMaxNm).toBe(one.lambdaMaxNm);
    expect(a.xyz[0]).not.toBeCloseTo(one.xyz[0], 2);
  });

  it.each([
    [["spectrum", "/no/such/file.csv"], /does not exist/],
    [["spectrum", "empty.csv"], /empty/],
    [["spectrum", "comma.csv"], /header/],
    [["spectrum", "bad-number.csv"], /Line 3/],
    [["spectrum", "binary.csv"], /UTF-8|header/],
    [["spectrum", "band.csv", "--scale", "-1"], /--scale needs a value/],
    [["spectrum", "band.csv", "--scale=-1"], /non-negative number/],
    [["spectrum", "band.csv", "--scale", "two"], /non-negative number/],
    [["spectrum", "band.csv", "--illuminant", "F2"], /D65, D50 or A/],
    [["spectrum"], /Give the spectrum CSV file/],
  ])("refuses %j cleanly", async (args, pattern) => {
    const run = await cli(args.map((a, i) => (i === 1 && !a.startsWith("/") ? file(a) : a)));
    expectRefusal(run, pattern);
  });
});

describe("cli pka", () => {
  it("prints the contract's JSON and recovers the pKa of the series", async () => {
    const run = await cli(["pka", file("series.csv")], true);
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout);
    expect(Object.keys(out).slice(0, 6)).toEqual(["pKa", "pKaStdErr", "transition", "acidLab", "baseLab", "rmsDeltaE00"]);
    const truth = -Math.log10(5.0e-8);
    expect(Math.abs(out.pKa - truth), run.stdout).toBeLessThan(0.05);
    expect(out.apparent).toBe(true);
    expect(out.flags).toEqual([]);
    expect(out.transition[0]).toBeLessThan(out.pKa);
    expect(out.transition[1]).toBeGreaterThan(out.pKa);
    expect(out.rmsDeltaE00).toBeLessThan(0.5);
  });

  it("--steps 2 fits both constants of a two-step indicator (thymol blue) within 0.1", async () => {
    const run = await cli(["pka", file("thymol-blue.csv"), "--steps", "2"]);
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout);
    expect(out.steps).toBe(2);
    expect(Math.abs(out.pKas[0] - -Math.log10(2.2e-2)), run.stdout).toBeLessThan(0.1);
    expect(Math.abs(out.pKas[1] - -Math.log10(6.3e-10)), run.stdout).toBeLessThan(0.1);
    expect(out.pKaStdErrs.every((s: number) => s > 0 && s < 0.1)).toBe(true);
    expect(out.transitions).toHaveLength(2);
    expect(out.intermediateLab).toHaveLength(3);
  }, 120_000);

  it.each([
    [["pka", "/no/such/series.csv"], /does not exist/],
    [["pka", "short-series.csv"], /at least 5 vials/],
    [["pka", "band.csv"], /header/],
    [["pka", "series.csv", "--blank", "100,0"], /3 comma-separated numbers/],
    [["pka", "series.csv", "--steps", "3"], /--steps is 1 \(one colour change\) or 2/],
    [["pka"], /Give the pH series CSV file/],
  ])("refuses %j cleanly", async (args, pattern) => {
    const run = await cli(args.map((a, i) => (i === 1 && !a.startsWith("/") ? file(a) : a)));
    expectRefusal(run, pattern);
  });
});
