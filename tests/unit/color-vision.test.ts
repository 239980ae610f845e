import { filterDeficiencyDeuter, filterDeficiencyProt, filterDeficiencyTrit } from "culori";
import { describe, expect, it } from "vitest";
import { labToLinearSrgb, linearSrgbToLab } from "@/lib/color/convert";
import { mat3Determinant } from "@/lib/color/matrix";
import { deltaE00 } from "@/lib/color/difference";
import { srgbDecode, srgbEncode } from "@/lib/color/srgb";
import type { Lab, Vec3 } from "@/lib/color/types";
import { MACHADO_2009_SEVERITY_1, deltaE00ForViewer, simulateViewerLab, type ViewerKind } from "@/lib/color/vision";

const KINDS: ViewerKind[] = ["protan", "deutan", "tritan"];

describe("colour-vision check (Machado, Oliveira & Fernandes, IEEE TVCG 15 (2009) 1291, in linear RGB)", () => {
  it.each(KINDS)("%s: a neutral grey looks the same (each row of the Machado matrices sums to 1)", (kind) => {
    const seen = simulateViewerLab([60, 0, 0], kind);
    expect(seen[0]).toBeCloseTo(60, 2);
    expect(Math.hypot(seen[1], seen[2])).toBeLessThan(0.3);
  });

  it("a red–green pair that is far apart for normal vision nearly merges for protan and deutan viewers, not for tritan", () => {
    // Two colours of similar lightness on the red–green axis (chosen for the test).
    const red: Lab = [55, 45, 30];
    const green: Lab = [55, -40, 35];
    const normal = deltaE00(red, green);
    expect(normal).toBeGreaterThan(40);
    expect(deltaE00ForViewer(red, green, "protan")).toBeLessThan(normal / 3);
    expect(deltaE00ForViewer(red, green, "deutan")).toBeLessThan(normal / 3);
    expect(deltaE00ForViewer(red, green, "tritan")).toBeGreaterThan(normal / 2);
  });

  it("a blue–green pair confused along the tritan line shrinks most for the tritan viewer", () => {
    const blue: Lab = [60, -20, -30];
    const green: Lab = [60, -30, 10];
    const tritan = deltaE00ForViewer(blue, green, "tritan");
    expect(tritan).toBeLessThan(deltaE00ForViewer(blue, green, "protan"));
    expect(tritan).toBeLessThan(deltaE00(blue, green) / 2);
  });

  it.each([
    ["protan", filterDeficiencyProt(1)],
    ["deutan", filterDeficiencyDeuter(1)],
    ["tritan", filterDeficiencyTrit(1)],
  ] as const)("%s: our matrix (typed from the paper's severity-1.0 table) equals culori's separate transcription, applied to linear RGB", (kind, filter) => {
    // culori copied the same published table (authors' page via the R colorspace package); feeding it
    // linear values makes it a second, independent transcription of the matrix to compare with.
    for (const lab of [[50, 30, -20], [70, -25, 40], [40, 10, 10]] as Lab[]) {
      const lin = labToLinearSrgb(lab, "D65");
      const expected = filter({ mode: "rgb", r: lin[0], g: lin[1], b: lin[2] });
      const seen = labToLinearSrgb(simulateViewerLab(lab, kind), "D65");
      expect(seen[0]).toBeCloseTo(expected.r, 9);
      expect(seen[1]).toBeCloseTo(expected.g, 9);
      expect(seen[2]).toBeCloseTo(expected.b, 9);
    }
  });

  it.each(["protan", "deutan"] as const)("%s: the dichromat matrix is singular (colours collapse onto a plane, Machado et al. 2009 §3) and keeps white", (kind) => {
    const m = MACHADO_2009_SEVERITY_1[kind];
    expect(Math.abs(mat3Determinant(m))).toBeLessThan(1e-5);
    for (const row of m) expect(row[0] + row[1] + row[2]).toBeCloseTo(1, 5);
  });

  it("works on linear RGB: on a methyl red pair (red ≈ L* 55 / yellow ≈ L* 85, from memory) gamma-encoded application overstates the deutan difference by about 10 ΔE00", () => {
    const red: Lab = [55, 60, 35];
    const yellow: Lab = [85, 5, 80];
    const linear = deltaE00ForViewer(red, yellow, "deutan");
    const encode = (lab: Lab) => labToLinearSrgb(lab, "D65").map(srgbEncode);
    const viaGamma = (lab: Lab) => {
      const e = encode(lab);
      const out = filterDeficiencyDeuter(1)({ mode: "rgb", r: e[0], g: e[1], b: e[2] });
      return linearSrgbToLab([srgbDecode(out.r), srgbDecode(out.g), srgbDecode(out.b)], "D65");
    };
    const gamma = deltaE00(viaGamma(red), viaGamma(yellow));
    expect(Math.abs(gamma - linear)).toBeGreaterThan(5);
    // Linear application of a matrix commutes with mixing light; check it on a 50:50 additive mix.
    const a = labToLinearSrgb(red, "D65");
    const b = labToLinearSrgb(yellow, "D65");
    const mix = linearSrgbToLab([0, 1, 2].map((c) => (a[c] + b[c]) / 2) as Vec3, "D65");
    const seenMix = labToLinearSrgb(simulateViewerLab(mix, "deutan"), "D65");
    const sa = labToLinearSrgb(simulateViewerLab(red, "deutan"), "D65");
    const sb = labToLinearSrgb(simulateViewerLab(yellow, "deutan"), "D65");
    for (let c = 0; c < 3; c++) expect(seenMix[c]).toBeCloseTo((sa[c] + sb[c]) / 2, 9);
  });
});
