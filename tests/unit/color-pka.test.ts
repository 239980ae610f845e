import { describe, expect, it } from "vitest";
import { labToLinearSrgb, linearSrgbToLab } from "@/lib/color/convert";
import { deltaE00 } from "@/lib/color/difference";
import { ColorInputError } from "@/lib/color/errors";
import { baseFraction, fitPkaHendersonHasselbalch, parsePhSeriesCsv, type PhPoint } from "@/lib/color/pka";
import type { Lab, Vec3 } from "@/lib/color/types";

// Two forms of an invented indicator (yellow acid, violet base), mixed by Beer–Lambert per channel.
const ACID: Lab = [85, 2, 60];
const BASE: Lab = [45, 55, -40];
const BLANK: Lab = [100, 0, 0];

function series(pKa: number, pHs: number[], noise = 0, blankLab: Lab = BLANK): PhPoint[] {
  const blank = labToLinearSrgb(blankLab, "D65");
  const absOf = (lab: Lab) => labToLinearSrgb(lab, "D65").map((v, c) => -Math.log10(v / blank[c]));
  const a = absOf(ACID);
  const b = absOf(BASE);
  return pHs.map((pH, i) => {
    const f = baseFraction(pH, pKa);
    const rgb = [0, 1, 2].map((c) => blank[c] * 10 ** -((1 - f) * a[c] + f * b[c])) as Vec3;
    const lab = linearSrgbToLab(rgb, "D65");
    // Fixed ± pattern so the test is deterministic.
    const wobble = noise * (i % 2 === 0 ? 1 : -1);
    return { pH, lab: [lab[0] + wobble, lab[1] - wobble, lab[2] + wobble] as Lab };
  });
}

const PH = Array.from({ length: 13 }, (_, i) => 4 + 0.5 * i);

describe("pKa by a Henderson–Hasselbalch two-form fit (Po & Senozan, J. Chem. Educ. 78 (2001) 1499)", () => {
  it("base fraction is 1/2 at pH = pKa and 10 % / 90 % at pKa ∓ log10 9", () => {
    expect(baseFraction(7, 7)).toBeCloseTo(0.5, 12);
    expect(baseFraction(7 - Math.log10(9), 7)).toBeCloseTo(0.1, 12);
    expect(baseFraction(7 + Math.log10(9), 7)).toBeCloseTo(0.9, 12);
  });

  it("recovers a known pKa and both forms from noise-free colours", () => {
    const fit = fitPkaHendersonHasselbalch(series(7.23, PH));
    expect(fit.pKa).toBeCloseTo(7.23, 4);
    expect(deltaE00(fit.acidLab, ACID)).toBeLessThan(0.01);
    expect(deltaE00(fit.baseLab, BASE)).toBeLessThan(0.01);
    expect(fit.rmsDeltaE00).toBeLessThan(0.01);
    expect(fit.transition[0]).toBeCloseTo(7.23 - Math.log10(9), 4);
    expect(fit.transition[1]).toBeCloseTo(7.23 + Math.log10(9), 4);
  });

  it("stays within 0.05 pH units with colour noise of ±0.5 in L*, a*, b*, and reports a standard error", () => {
    const fit = fitPkaHendersonHasselbalch(series(6.4, PH, 0.5));
    expect(Math.abs(fit.pKa - 6.4)).toBeLessThan(0.05);
    expect(fit.pKaStdErr).toBeGreaterThan(0);
    expect(fit.pKaStdErr).toBeLessThan(0.1);
    expect(fit.rmsDeltaE00).toBeGreaterThan(0.1);
  });

  it("uses the blank: the same dye in a tinted solvent gives the same pKa", () => {
    const tinted: Lab = [96, -2, 6];
    const fit = fitPkaHendersonHasselbalch(series(8.1, PH, 0, tinted), tinted);
    expect(fit.pKa).toBeCloseTo(8.1, 3);
  });

  it("refuses too few vials, no colour change and a transition outside the measured range", () => {
    expect(() => fitPkaHendersonHasselbalch(series(7, [5, 6, 7, 8]))).toThrow(/at least 5 vials/);
    const flat = PH.map((pH) => ({ pH, lab: [60, 10, 10] as Lab }));
    expect(() => fitPkaHendersonHasselbalch(flat)).toThrow(/barely changes/);
    expect(() => fitPkaHendersonHasselbalch(series(11.5, [4, 5, 6, 7, 8, 9]))).toThrow(ColorInputError);
  });

  it("reads the CSV header pH,L,a,b", () => {
    expect(parsePhSeriesCsv("pH,L,a,b\n4,80,1,50\n")).toEqual([{ pH: 4, lab: [80, 1, 50] }]);
    expect(() => parsePhSeriesCsv("pH,L,a\n4,80,1\n")).toThrow(/header/);
    expect(() => parsePhSeriesCsv("pH,L,a,b\n4,80,x,50\n")).toThrow(/Line 2/);
  });
});
