import { describe, expect, it } from "vitest";
import { deltaE00, deltaE76, deltaE94 } from "@/lib/color/difference";
import type { Lab } from "@/lib/color/types";
import { readFixtureCsv } from "../support/fixtures";

/** Sharma, Wu & Dalal (2005) print ΔE00 to 4 decimals: agreement means |error| < 0.5 in the 4th decimal. */
const FOUR_DECIMALS = 5e-5;

const rows = readFixtureCsv("ciede2000_sharma2005_table1.csv").map((r) => ({
  pair: Number(r.pair),
  x: [Number(r.L1), Number(r.a1), Number(r.b1)] as Lab,
  y: [Number(r.L2), Number(r.a2), Number(r.b2)] as Lab,
  expected: Number(r.dE00),
}));

describe("CIEDE2000 against Sharma, Wu & Dalal, Color Res. Appl. 30 (2005) 21–30, Table 1", () => {
  it("has all 34 pairs in the fixture", () => {
    expect(rows).toHaveLength(34);
  });

  it.each(rows)("pair $pair: ΔE00 = $expected to 4 decimals", ({ x, y, expected }) => {
    expect(Math.abs(deltaE00(x, y) - expected)).toBeLessThan(FOUR_DECIMALS);
  });

  it.each(rows)("pair $pair is symmetric (ΔE00(x, y) = ΔE00(y, x))", ({ x, y }) => {
    expect(deltaE00(y, x)).toBeCloseTo(deltaE00(x, y), 12);
  });

  it("is zero for identical colours and NaN-free at the neutral axis", () => {
    expect(deltaE00([50, 0, 0], [50, 0, 0])).toBe(0);
    expect(Number.isFinite(deltaE00([50, 0, 0], [60, 0, 0]))).toBe(true);
  });
});

describe("CIE76 and CIE94", () => {
  it("ΔE*ab is the Euclidean distance in CIELAB (CIE 015:2018 eq. 8.5)", () => {
    expect(deltaE76([50, 10, -10], [53, 14, -10])).toBeCloseTo(5, 12);
  });

  it("ΔE*94 follows CIE 116-1995 with graphic-arts weights (SL = 1, SC = 1 + 0.045 C1, SH = 1 + 0.015 C1)", () => {
    // Hand computation from the formula (no published pair used): x = (50, 3, 4) so C1 = 5;
    // y = (52, 0, 0): ΔL = 2, ΔC = 5, ΔH² = ΔE76² − ΔL² − ΔC² = 29 − 4 − 25 = 0.
    const expected = Math.sqrt(2 ** 2 + (5 / (1 + 0.045 * 5)) ** 2);
    expect(deltaE94([50, 3, 4], [52, 0, 0])).toBeCloseTo(expected, 10);
    // For a pair that differs only in lightness all three formulas give ΔL (CIEDE2000 with SL at L̄ = 50 → 1).
    expect(deltaE94([50, 0, 0], [51, 0, 0])).toBeCloseTo(1, 12);
  });
});
