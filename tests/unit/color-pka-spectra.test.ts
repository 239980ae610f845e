/**
 * pKa from spectra at each pH (lib/color/pka-spectra.ts): global fit in absorbance, SVD rank check,
 * isosbestic points. Truth: handbook pKa of bromothymol blue (Ka 5.0e-8, Alberta Education Chemistry 30
 * Data Booklet 2010, tests/fixtures/ph_indicators_alberta_chem30.csv). Spectra: log-normal bands with a
 * vibronic shoulder (tests/support/indicator-series.ts), noise added per point.
 */
import { describe, expect, it } from "vitest";
import { fitPkaFromSpectra, type SpectrumAtPh } from "@/lib/color/pka-spectra";
import { gaussian, mulberry32 } from "@/lib/random";
import { readFixtureCsv } from "../support/fixtures";
import { formSpectrum, indicatorForm, logNormalAbsorbance, type LogNormalBand } from "../support/indicator-series";

const truth = -Math.log10(Number(readFixtureCsv("ph_indicators_alberta_chem30.csv").find((r) => r.indicator === "bromothymol blue")!.Ka));
const ACID = indicatorForm(432, 1.0);
const BASE = indicatorForm(617, 1.0);

function series(pHs: number[], sigma: number, seed: number, extra?: (pH: number, nm: number) => number): SpectrumAtPh[] {
  const random = mulberry32(seed);
  return pHs.map((pH) => {
    const f = 1 / (1 + 10 ** (truth - pH));
    const wavelengths = Array.from({ length: 201 }, (_, i) => 380 + 2 * i);
    const values = wavelengths.map((nm) => (1 - f) * logNormalAbsorbance(ACID, nm) + f * logNormalAbsorbance(BASE, nm) + (extra?.(pH, nm) ?? 0) + sigma * gaussian(random));
    return { pH, spectrum: { wavelengths, values } };
  });
}
const PHS = Array.from({ length: 15 }, (_, i) => 5.3 + 0.3 * i);

/** Where the generating spectra cross (bisection on the generator itself, not the fit). */
function trueCrossings(acid: LogNormalBand[], base: LogNormalBand[]): number[] {
  const d = (nm: number) => logNormalAbsorbance(acid, nm) - logNormalAbsorbance(base, nm);
  const out: number[] = [];
  for (let nm = 380; nm < 780; nm++) {
    if (Math.sign(d(nm)) !== Math.sign(d(nm + 1))) {
      let lo = nm;
      let hi = nm + 1;
      for (let k = 0; k < 40; k++) {
        const mid = (lo + hi) / 2;
        if (Math.sign(d(mid)) === Math.sign(d(lo))) lo = mid;
        else hi = mid;
      }
      out.push((lo + hi) / 2);
    }
  }
  return out;
}

describe("pKa from spectra by a global fit in absorbance", () => {
  it("recovers bromothymol blue's handbook pKa within 0.05 from noisy spectra (σ 0.003), two species, isosbestic point where the forms cross", () => {
    const fit = fitPkaFromSpectra(series(PHS, 0.003, 1));
    expect(Math.abs(fit.pKa - truth)).toBeLessThan(0.05);
    expect(fit.pKaStdErr).toBeGreaterThan(0);
    expect(fit.pKaStdErr).toBeLessThan(0.02);
    expect(fit.species).toBe(2);
    expect(fit.flags).toEqual([]);
    const crossings = trueCrossings(ACID, BASE).filter((nm) => logNormalAbsorbance(ACID, nm) > 0.05);
    expect(crossings.length).toBeGreaterThan(0);
    for (const nm of crossings) expect(fit.isosbesticPoints.some((p) => Math.abs(p.nm - nm) < 2)).toBe(true);
    // The fitted acid spectrum is the generator's, point by point, within a few noise levels.
    const acid = formSpectrum(ACID);
    fit.wavelengths.forEach((nm, j) => expect(Math.abs(fit.acidSpectrum[j] - acid.values[nm - 300])).toBeLessThan(0.02));
  });

  it("says when more than two species are present (a third absorber that grows with pH)", () => {
    const third = (pH: number, nm: number) => 0.3 * Math.max(0, pH - 7) * Math.exp(-(((nm - 500) / 25) ** 2));
    const fit = fitPkaFromSpectra(series(PHS, 0.003, 2, third), { bootstrapRuns: 10 });
    expect(fit.species).toBeGreaterThan(2);
    expect(fit.flags).toContain("more-than-two-species");
  });

  it("flags a missing plateau and refuses too few spectra", () => {
    const fit = fitPkaFromSpectra(series([5, 5.5, 6, 6.5, 7, 7.3], 0.003, 3), { bootstrapRuns: 10 });
    expect(fit.flags).toContain("base-plateau-missing");
    expect(() => fitPkaFromSpectra(series([6, 7, 8], 0.003, 4))).toThrow(/5 or more pH values/);
  });
});
