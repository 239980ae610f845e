import { describe, expect, it } from "vitest";
import { BRADFORD, XYZ_D65_TO_D50, labD50ToLabD65, labD65ToLabD50, labToLinearSrgb, linearSrgbToLab, xyzD65ToXyzD50 } from "@/lib/color/convert";
import { WHITE_POINTS_2DEG } from "@/lib/color/illuminants";
import { labToLch, lchToLab } from "@/lib/color/lab";
import { mat3Mul } from "@/lib/color/matrix";
import { SRGB_TO_XYZ_D65, XYZ_D65_TO_SRGB, linearSrgbToHex, linearSrgbToXyzD65, srgbDecode, srgbEncode } from "@/lib/color/srgb";
import { readFixtureCsv } from "../support/fixtures";

const params = Object.fromEntries(readFixtureCsv("srgb_iec61966_2_1_parameters.csv").map((r) => [r.parameter, Number(r.value)]));

describe("sRGB, IEC 61966-2-1:1999 (constants from tests/fixtures/srgb_iec61966_2_1_parameters.csv)", () => {
  it("uses the standard's RGB → XYZ matrix (4 decimals as printed; ours is derived from the primaries and the CIE 015 D65 white, so it may differ by up to 2 in the 4th decimal)", () => {
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      expect(Math.abs(SRGB_TO_XYZ_D65[i][j] - params[`M_RGB_to_XYZ_${i + 1}${j + 1}`])).toBeLessThanOrEqual(2.5e-4);
    }
  });

  it("uses the standard's XYZ → RGB matrix (ICC note 7-decimal inverse, same tolerance reason)", () => {
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      expect(Math.abs(XYZ_D65_TO_SRGB[i][j] - params[`M_XYZ_to_RGB_7dp_${i + 1}${j + 1}`])).toBeLessThanOrEqual(1e-3);
    }
  });

  it("has mutually inverse matrices", () => {
    const id = mat3Mul(SRGB_TO_XYZ_D65, XYZ_D65_TO_SRGB);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(id[i][j]).toBeCloseTo(i === j ? 1 : 0, 6);
  });

  it("matches the primaries' chromaticities (IEC 61966-2-1 Table 1)", () => {
    for (const [c, name] of [[0, "R"], [1, "G"], [2, "B"]] as const) {
      const X = SRGB_TO_XYZ_D65[0][c];
      const Y = SRGB_TO_XYZ_D65[1][c];
      const Z = SRGB_TO_XYZ_D65[2][c];
      expect(X / (X + Y + Z)).toBeCloseTo(params[`primary_${name}_x`], 4);
      expect(Y / (X + Y + Z)).toBeCloseTo(params[`primary_${name}_y`], 4);
    }
  });

  it("uses the standard's transfer function: linear below 0.0031308 with slope 12.92, else 1.055 v^(1/2.4) − 0.055", () => {
    const t = params.eotf_inverse_linear_threshold;
    expect(srgbEncode(t / 2)).toBeCloseTo(params.eotf_inverse_linear_slope * (t / 2), 12);
    const v = 0.5;
    expect(srgbEncode(v)).toBeCloseTo(params.eotf_inverse_scale * v ** (1 / params.eotf_exponent) - params.eotf_inverse_offset, 12);
    for (const e of [0, 0.02, 0.04045, 0.2, 0.5, 0.9, 1]) expect(srgbEncode(srgbDecode(e))).toBeCloseTo(e, 7);
    // Continuity at the threshold (the standard's rounded constants leave a gap below 1e-7).
    expect(Math.abs(srgbEncode(t) - srgbEncode(t + 1e-12))).toBeLessThan(1e-7);
  });

  it("maps sRGB white to D65 white, L* = 100, a* = b* = 0 (CIE 015:2018 white 95.047/100/108.883)", () => {
    const xyz = linearSrgbToXyzD65([1, 1, 1]);
    expect(xyz[0]).toBeCloseTo(95.047, 2);
    expect(xyz[1]).toBeCloseTo(100, 4);
    expect(xyz[2]).toBeCloseTo(108.883, 2);
    const lab = linearSrgbToLab([1, 1, 1], "D65");
    expect(lab[0]).toBeCloseTo(100, 4);
    expect(lab[1]).toBeCloseTo(0, 3);
    expect(lab[2]).toBeCloseTo(0, 3);
    expect(linearSrgbToHex([1, 1, 1])).toBe("#ffffff");
    expect(linearSrgbToHex([0, 0, 0])).toBe("#000000");
  });
});

describe("Bradford chromatic adaptation D65 → D50", () => {
  it("maps the D65 white onto the D50 white (CIE 015:2018 Table 9.1 whites)", () => {
    const w = xyzD65ToXyzD50(WHITE_POINTS_2DEG.D65);
    for (let c = 0; c < 3; c++) expect(w[c]).toBeCloseTo(WHITE_POINTS_2DEG.D50[c], 6);
  });

  it("uses the Bradford cone matrix of Lam (1985) as in ICC.1 Annex E", () => {
    expect(BRADFORD[0]).toEqual([0.8951, 0.2664, -0.1614]);
    expect(BRADFORD[1]).toEqual([-0.7502, 1.7135, 0.0367]);
    expect(BRADFORD[2]).toEqual([0.0389, -0.0685, 1.0296]);
  });

  it("gives the widely tabulated D65 → D50 Bradford matrix (B. Lindbloom's table, from memory)", () => {
    const expected = [
      [1.0478112, 0.0228866, -0.050127],
      [0.0295424, 0.9904844, -0.0170491],
      [-0.0092345, 0.0150436, 0.7521316],
    ];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(XYZ_D65_TO_D50[i][j]).toBeCloseTo(expected[i][j], 5);
  });

  it("keeps sRGB white neutral in CIELAB D50 and round-trips Lab between the whites", () => {
    const lab50 = linearSrgbToLab([1, 1, 1], "D50");
    expect(lab50[0]).toBeCloseTo(100, 4);
    expect(Math.hypot(lab50[1], lab50[2])).toBeLessThan(1e-3);
    const lab: [number, number, number] = [45, 30, -20];
    const back = labD50ToLabD65(labD65ToLabD50(lab));
    for (let c = 0; c < 3; c++) expect(back[c]).toBeCloseTo(lab[c], 9);
    const rgb = labToLinearSrgb(lab, "D50");
    const again = linearSrgbToLab(rgb, "D50");
    for (let c = 0; c < 3; c++) expect(again[c]).toBeCloseTo(lab[c], 9);
  });

  it("converts Lab ↔ LCh with hue in 0–360°", () => {
    const lch = labToLch([50, 0, -20]);
    expect(lch[1]).toBeCloseTo(20, 12);
    expect(lch[2]).toBeCloseTo(270, 12);
    const lab = lchToLab(lch);
    expect(lab[1]).toBeCloseTo(0, 12);
    expect(lab[2]).toBeCloseTo(-20, 12);
  });
});
