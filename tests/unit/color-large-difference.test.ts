/**
 * The large-difference metric (lib/color/large-difference.ts): ΔEOK, Euclidean OKLab distance ×100.
 */
import { describe, expect, it } from "vitest";
import { WHITE_POINTS_2DEG } from "@/lib/color/illuminants";
import { xyzToLab } from "@/lib/color/lab";
import { deltaEOK, labD65ToOklab } from "@/lib/color/large-difference";
import type { Lab } from "@/lib/color/types";
import { ciede2000 } from "@/lib/search/ciede2000";
import { scoreShifts } from "@/lib/search/shift";

const rad = (deg: number) => (deg * Math.PI) / 180;
const lch = (l: number, c: number, h: number): Lab => [l, c * Math.cos(rad(h)), c * Math.sin(rad(h))];

describe("OKLab conversion (B. Ottosson 2020, 'A perceptual color space for image processing', table of XYZ → OKLab; values from memory)", () => {
  it.each([
    [[0.95, 1, 1.089], [1.0, 0.0, 0.0]],
    [[1, 0, 0], [0.45, 1.236, -0.014]],
    [[0, 1, 0], [0.922, -0.671, 0.263]],
    [[0, 0, 1], [0.153, -1.415, -0.449]],
  ])("XYZ %j → OKLab %j within 0.006", (xyz, expected) => {
    const lab = xyzToLab(xyz.map((v) => v * 100) as Lab, WHITE_POINTS_2DEG.D65);
    const ok = labD65ToOklab(lab);
    for (let c = 0; c < 3; c++) expect(Math.abs(ok[c] - expected[c])).toBeLessThan(0.006);
  });
});

describe("ΔEOK for large differences", () => {
  it("is continuous across the hue where CIEDE2000 jumps: a yellow–blue pair, the blue's hue swept in 0.02° steps", () => {
    // CIEDE2000 (Sharma, Wu & Dalal 2005 eq. 7, 14) takes the mean hue h̄' as (h1'+h2')/2 or that ± 180°
    // depending on whether |h1' − h2'| exceeds 180°: for complementary hues the mean flips and ΔE00 jumps.
    const yellow = lch(85, 70, 95);
    let maxStep00 = 0;
    let maxStepOK = 0;
    let previous: { d00: number; dOK: number } | null = null;
    for (let h = 265; h <= 285; h += 0.02) {
      const blue = lch(45, 55, h);
      const d00 = ciede2000(...yellow, ...blue);
      const dOK = deltaEOK(yellow, blue);
      if (previous) {
        maxStep00 = Math.max(maxStep00, Math.abs(d00 - previous.d00));
        maxStepOK = Math.max(maxStepOK, Math.abs(dOK - previous.dOK));
      }
      previous = { d00, dOK };
    }
    expect(maxStep00).toBeGreaterThan(3); // the jump the metric is chosen to avoid
    expect(maxStepOK).toBeLessThan(0.05);
  });

  it("is a metric: zero for equal colours, symmetric, triangle inequality", () => {
    const x = lch(70, 40, 30);
    const y = lch(40, 60, 250);
    const z = lch(90, 10, 100);
    expect(deltaEOK(x, x)).toBeLessThan(1e-9);
    expect(deltaEOK(x, y)).toBeCloseTo(deltaEOK(y, x), 12);
    expect(deltaEOK(x, z)).toBeLessThanOrEqual(deltaEOK(x, y) + deltaEOK(y, z) + 1e-9);
  });

  it("shift search ranks the largest change by ΔEOK and still reports ΔE00", () => {
    const yellow = lch(85, 70, 95);
    const colour = (lab: Lab) => ({ lab, solventId: "s", payload: null });
    const dyes = [
      { dyeId: "blue-a", a: [colour(yellow)], b: [colour(lch(45, 55, 274.99))] },
      { dyeId: "blue-b", a: [colour(yellow)], b: [colour(lch(45, 55, 275.01))] },
    ];
    const { results } = scoreShifts(dyes, { minShift: 0, sameSolvent: false, viewers: [], viewerMinShift: 0 }, () => 0);
    for (const r of results) {
      expect(r.shift).toBe(ciede2000(...r.a.lab, ...r.b.lab));
      expect(r.shiftOK).toBeCloseTo(deltaEOK(r.a.lab, r.b.lab), 12);
    }
    expect(results[0].shiftOK).toBeGreaterThanOrEqual(results[1].shiftOK);
  });
});
