/**
 * Two pKa's of a two-step indicator from a photographed pH series (lib/color/pka-two-step.ts).
 *
 * Truth values: thymol blue in tests/fixtures/ph_indicators_alberta_chem30.csv (Alberta Education,
 * Chemistry 30 Data Booklet, 2010, p. 10): Ka1 2.2e-2 (pKa1 1.66, red → yellow) and Ka2 6.3e-10 (pKa2
 * 9.20, yellow → blue). Series: tests/support/indicator-series.ts — three log-normal forms with a vibronic
 * shoulder, fractions written in concentrations, mixed per wavelength, colour by the CIE 015 summation —
 * a DIFFERENT process from the fit's Gaussian band model, with noise added.
 */
import { describe, expect, it } from "vitest";
import { deltaE00 } from "@/lib/color/difference";
import { ColorInputError } from "@/lib/color/errors";
import { fitPkaFromColours } from "@/lib/color/pka";
import { MIN_PKA_GAP, diproticFractions, fitTwoPkaFromColours } from "@/lib/color/pka-two-step";
import { readFixtureCsv } from "../support/fixtures";
import { indicatorForm, twoStepIndicatorSeries } from "../support/indicator-series";

const HANDBOOK = readFixtureCsv("ph_indicators_alberta_chem30.csv").filter((r) => r.indicator === "thymol blue");
const [PKA1, PKA2] = HANDBOOK.map((r) => -Math.log10(Number(r.Ka))).sort((p, q) => p - q);
/** The task's tolerance for each recovered pKa. */
const TOL = 0.1;
/** Thymol blue's forms as bands (λmax from memory, approximate): red 545 nm, yellow 430 nm, blue 596 nm; peak absorbance 1.0. */
const FORMS = [indicatorForm(545, 1.0), indicatorForm(430, 1.0), indicatorForm(596, 1.0)] as Parameters<typeof twoStepIndicatorSeries>[0];
const range = (from: number, to: number, step: number) => Array.from({ length: Math.round((to - from) / step) + 1 }, (_, i) => Math.round((from + step * i) * 100) / 100);

describe("diprotic fractions ([H⁺]² : [H⁺]Ka1 : Ka1Ka2, any analytical chemistry text)", () => {
  it("sum to 1, are equal pairwise at each pKa, and the middle form peaks at 10^(Δ/2)/(2 + 10^(Δ/2)) midway", () => {
    const f = diproticFractions(1.66, 1.66, 9.2);
    expect(f[0]).toBeCloseTo(f[1], 6);
    expect(f[0] + f[1] + f[2]).toBeCloseTo(1, 12);
    const g = diproticFractions(9.2, 1.66, 9.2);
    expect(g[1]).toBeCloseTo(g[2], 6);
    const m = diproticFractions(5.5, 5, 6)[1];
    expect(m).toBeCloseTo(10 ** 0.5 / (2 + 10 ** 0.5), 10);
    expect(diproticFractions(-30, 1, 2)[0]).toBeCloseTo(1, 12);
    expect(diproticFractions(40, 1, 2)[2]).toBeCloseTo(1, 12);
  });
});

describe("thymol blue (handbook pKa1 1.66, pKa2 9.20; red → yellow → blue)", () => {
  it("the truth values come from the booklet", () => {
    expect(PKA1).toBeCloseTo(1.658, 3);
    expect(PKA2).toBeCloseTo(9.201, 3);
  });

  const series = twoStepIndicatorSeries(FORMS, PKA1, PKA2, range(0, 11.5, 0.5), 0.3, 11);

  it("recovers both pKa within 0.1 with bootstrap SEs, three colours close to the plateaus and two transition bands", () => {
    const fit = fitTwoPkaFromColours(series);
    expect(Math.abs(fit.pKas[0] - PKA1)).toBeLessThan(TOL);
    expect(Math.abs(fit.pKas[1] - PKA2)).toBeLessThan(TOL);
    for (const se of fit.pKaStdErrs) {
      expect(se).toBeGreaterThan(0);
      expect(se).toBeLessThan(0.1);
    }
    expect(deltaE00(fit.labs[0], series[0].lab)).toBeLessThan(2.5);
    expect(deltaE00(fit.labs[1], series.find((p) => p.pH === 5.5)!.lab)).toBeLessThan(2.5);
    expect(deltaE00(fit.labs[2], series[series.length - 1].lab)).toBeLessThan(2.5);
    const [[l1, h1], [l2, h2]] = fit.transitions;
    expect(l1).toBeLessThan(fit.pKas[0]);
    expect(h1).toBeGreaterThan(fit.pKas[0]);
    expect(l2).toBeLessThan(fit.pKas[1]);
    expect(h2).toBeGreaterThan(fit.pKas[1]);
    expect(h1).toBeLessThan(l2);
    expect(fit.rmsDeltaE00).toBeLessThan(1.5);
  });

  it("the one-pKa fit on the same series misses both constants and leaves a far larger residual", () => {
    const two = fitTwoPkaFromColours(series, [100, 0, 0], { bootstrapRuns: 2 });
    const one = fitPkaFromColours(series, [100, 0, 0], { bootstrapRuns: 2 });
    expect(Math.abs(one.pKa - PKA1)).toBeGreaterThan(TOL);
    expect(Math.abs(one.pKa - PKA2)).toBeGreaterThan(TOL);
    expect(one.rmsDeltaE00).toBeGreaterThan(10 * two.rmsDeltaE00);
  });

  it("refuses a series without the acid plateau (starts above pKa1), saying which vials to add", () => {
    const noAcid = twoStepIndicatorSeries(FORMS, PKA1, PKA2, range(2.5, 11.5, 0.5), 0.3, 12);
    expect(() => fitTwoPkaFromColours(noAcid, [100, 0, 0], { bootstrapRuns: 2 })).toThrow(/does not show three plateaus: no vial holds at least 80 % of H2In.*add vials below pH/);
  });

  it(`refuses pKa's closer than ${MIN_PKA_GAP} unit`, () => {
    const close = twoStepIndicatorSeries(FORMS, 6, 6.5, range(3, 9.5, 0.5), 0.3, 13);
    const refusal = (() => {
      try {
        fitTwoPkaFromColours(close, [100, 0, 0], { bootstrapRuns: 2 });
        return null;
      } catch (e) {
        return e;
      }
    })();
    expect(refusal).toBeInstanceOf(ColorInputError);
    expect((refusal as Error).message).toMatch(/closer than 1 pH unit/);
  });
});
