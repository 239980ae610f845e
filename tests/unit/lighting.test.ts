/**
 * The lighting workflow's pure parts: the card CSV reader (line and column of every problem), where a
 * rows × columns grid puts its sampling regions, and what a profile's state means on a given day.
 * The white-point conversion check compares with Bradford-adapted D50 values computed from the
 * CIE tables independently of lib/color (tests/support/spectral-card.ts).
 */
import { describe, expect, it } from "vitest";
import { patchRegions, type Corners } from "@/lib/lighting/grid";
import { parseTargetCsv } from "@/lib/lighting/target-csv";
import { benchRefusal, profileStatus } from "@/lib/lighting/status";
import { withinTolerance } from "@/lib/lighting/calibration";
import { runPipeline } from "@/lib/bench/pipeline";
import { decodePhoto } from "@/lib/color/regions";
import { deltaE00 } from "@/lib/color/difference";
import sharp from "sharp";
import { spectrumLab, GREYS } from "../support/spectral-card";
import { labOf8 } from "../support/srgb-reference";

describe("card CSV", () => {
  it("reads name, L*, a*, b*, white point in any column order", () => {
    const r = parseTargetCsv("white point,name,b*,a*,L*\nD50,red,20.5,40,45\nD50,grey,0,0,50");
    expect(r).toEqual({ ok: true, whitePoint: "D50", patches: [{ name: "red", lab: [45, 40, 20.5] }, { name: "grey", lab: [50, 0, 0] }] });
  });

  it("names the line and column of every problem", () => {
    const r = parseTargetCsv("name,L*,a*,b*,white point\nred,140,1,2,D65\n,50,x,2,D65\nblue,40,1,2,F2\nred,40,1,2,D65");
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors).toEqual([
      "Line 2, column 2: “140” is not a L* value from 0 to 100.",
      "Line 3, column 1: the patch has no name.",
      "Line 3, column 3: “x” is not a a* value from -128 to 128.",
      "Line 4, column 5: “F2” is not a white point; write D65 or D50.",
      "Line 5, column 1: “red” is used twice; give every patch its own name.",
    ]);
  });

  it("refuses a missing column and mixed white points", () => {
    expect(parseTargetCsv("name,L*,a*,white point\nred,40,1,D65")).toMatchObject({ ok: false, errors: [expect.stringMatching(/no b\* column/)] });
    expect(parseTargetCsv("name,L*,a*,b*,white point\nred,40,1,2,D65\nblue,40,1,2,D50")).toMatchObject({ ok: false, errors: [expect.stringMatching(/both D65 and D50/)] });
  });
});

describe("grid placement", () => {
  it("puts one region in the middle of every cell, row by row", () => {
    const corners: Corners = [[100, 50], [700, 50], [700, 450], [100, 450]];
    const regions = patchRegions(corners, 4, 6);
    expect(regions).toHaveLength(24);
    // Cell 100 × 100 px; the sample is the middle half: 50 × 50 centred on (150 + 100k, 100 + 100r).
    expect(regions[0]).toEqual({ shape: "rect", x: 125, y: 75, w: 50, h: 50 });
    expect(regions[23]).toEqual({ shape: "rect", x: 625, y: 375, w: 50, h: 50 });
    expect(regions[7]).toEqual({ shape: "rect", x: 225, y: 175, w: 50, h: 50 });
  });

  it("follows a card photographed at an angle (a sheared quadrilateral)", () => {
    const corners: Corners = [[100, 100], [700, 160], [640, 560], [40, 500]];
    const regions = patchRegions(corners, 2, 2);
    const centre = (r: { x: number; y: number; w: number; h: number }) => [r.x + r.w / 2, r.y + r.h / 2];
    // Bilinear centre of the quadrilateral's first cell: mean of the cell's four corners.
    const [cx, cy] = centre(regions[0]);
    const expected = [(100 + 400 + 370 + 70) / 4, (100 + 130 + 330 + 300) / 4];
    expect(Math.abs(cx - expected[0])).toBeLessThan(1.5);
    expect(Math.abs(cy - expected[1])).toBeLessThan(1.5);
  });
});

describe("profile status", () => {
  const p = { name: "Box", state: "approved", validFrom: new Date("2026-01-01"), validUntil: new Date("2026-06-01") };
  it("approved only inside the validity window; drafts and retired profiles are refused with a sentence", () => {
    expect(profileStatus(p, new Date("2026-03-01"))).toBe("approved");
    expect(benchRefusal(p, new Date("2026-03-01"))).toBeNull();
    expect(profileStatus(p, new Date("2026-07-01"))).toBe("expired");
    expect(benchRefusal(p, new Date("2026-07-01"))).toMatch(/expired on 2026-06-01/);
    expect(profileStatus(p, new Date("2025-12-01"))).toBe("not-yet-valid");
    expect(profileStatus({ ...p, state: "draft" }, new Date("2026-03-01"))).toBe("draft");
    expect(benchRefusal({ ...p, state: "retired" }, new Date("2026-03-01"))).toMatch(/retired/);
  });

  it("approval tolerance: mean 2 and worst 4 ΔE00 leave-one-out by default (common practice, no source)", () => {
    expect(withinTolerance({ looMean: 1.9, looMax: 3.9 }).ok).toBe(true);
    expect(withinTolerance({ looMean: 2.1, looMax: 3 })).toMatchObject({ ok: false, reason: expect.stringMatching(/mean ΔE00 2.10/) });
    expect(withinTolerance({ looMean: 1, looMax: 4.5 })).toMatchObject({ ok: false, reason: expect.stringMatching(/worst patch ΔE00 4.50/) });
    expect(withinTolerance({ looMean: null, looMax: null }).ok).toBe(false);
  });
});

describe("bench pipeline: reference white points", () => {
  // Only a neutral can serve as a white reference, and a neutral is the same in D50 and D65 CIELAB, so
  // this checks the D50 path is accepted and consistent; that a chromatic D50 card is not read as D65
  // is checked in tests/integration/lighting.test.ts (D50 card, hold-out vials within 1.5 ΔE00).
  it("accepts a reference given under D50 and treats a neutral alike; refuses a chromatic reference", async () => {
    // A photo of a flat grey tile and a coloured vial, sRGB-encoded; the tile's known Lab is given under
    // D50 (computed from the CIE D50 table for a flat reflectance: a* = b* = 0, the same L*).
    const w = 200;
    const h = 100;
    const px = Buffer.alloc(w * h * 3);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) px.set(x < 100 ? [200, 200, 200] : [180, 60, 90], (y * w + x) * 3);
    const photo = await decodePhoto(await sharp(px, { raw: { width: w, height: h, channels: 3 } }).png().toBuffer());
    const greyD65 = labOf8([200, 200, 200]);
    // A flat grey has a* = b* = 0 under any illuminant (CIE 015): the D50 value has the same L*.
    const flat = spectrumLab(GREYS[0].reflectance, "D50");
    expect(Math.hypot(flat[1], flat[2])).toBeLessThan(0.05);
    const ref = { region: { shape: "rect" as const, x: 10, y: 10, w: 80, h: 80 }, lab: [greyD65[0], 0, 0] as [number, number, number] };
    const vial = { shape: "rect" as const, x: 110, y: 10, w: 80, h: 80 };
    const asD50 = runPipeline(photo, { vials: [vial], references: [{ ...ref, whitePoint: "D50" }], profile: null });
    const asD65 = runPipeline(photo, { vials: [vial], references: [ref], profile: null });
    const v50 = asD50.vials[0];
    const v65 = asD65.vials[0];
    if (!v50.ok || !v65.ok) throw new Error("not measured");
    // A neutral stays neutral through Bradford, so both give the same result, and the vial its sRGB colour.
    expect(deltaE00(v50.colour.lab, v65.colour.lab)).toBeLessThan(0.05);
    expect(deltaE00(v65.colour.lab, labOf8([180, 60, 90]))).toBeLessThan(0.3);
    expect(asD65.photoFlags).toContain("white-card-only");
    // A chromatic "white" is refused with a sentence.
    expect(() => runPipeline(photo, { vials: [vial], references: [{ ...ref, lab: [60, 20, 5] }], profile: null })).toThrow(/not neutral/);
  });
});

