/**
 * Band positions from spectra feed the solvent model (lib/models/dye-model.ts, issue 9).
 *
 * Generating process, different from the model that fits colours: each solvent's spectrum is ONE
 * log-normal band (skewness ρ = 1.3, Siano & Metzler, J. Chem. Phys. 51 (1969) 1856; tests/support/
 * indicator-series.ts) whose maximum follows an invented Kamlet–Taft law on the real solvent table
 * (tests/fixtures/solvents_kamlet_taft_secondary.csv, pcyep7/Solvent-selection; smoke-test quality, see
 * SOURCES.md), with seeded scatter in ν̃ standing in for specific solvation and instrument noise in
 * absorbance. λmax comes from the sampled spectrum (lib/color/spectrum.ts), the colour from the CIE 015
 * summation of the same spectrum; the colour model's Gaussian band is never used to make the data.
 */
import { describe, expect, it } from "vitest";
import { computeDyeModel, spectrumBandsBySolvent, type SolventColour, type TableSolvent } from "@/lib/models/dye-model";
import { lambdaMax, type SampledSpectrum } from "@/lib/color/spectrum";
import { modelSentence, modelSummary } from "@/lib/models/summary";
import { gaussian, mulberry32 } from "@/lib/random";
import { readFixtureCsv } from "../support/fixtures";
import { formSpectrum, mixtureLab } from "../support/indicator-series";

const KT_ROWS = readFixtureCsv("solvents_kamlet_taft_secondary.csv").filter((r) => ["kt_alpha", "kt_beta", "kt_pi_star", "dielectric_constant"].every((c) => r[c] !== ""));
const TABLE: TableSolvent[] = KT_ROWS.map((r) => ({
  solventId: r.solvent.toLowerCase().replace(/[^a-z0-9]+/g, "-"),
  solvent: r.solvent,
  parameters: { alpha: Number(r.kt_alpha), beta: Number(r.kt_beta), piStar: Number(r.kt_pi_star), permittivity: Number(r.dielectric_constant) },
}));

/** Invented dye (cm⁻¹): ν̃max = 18,500 − 1,300 π* + 2,400 α − 500 β, scatter σ = 120 cm⁻¹. */
const TRUTH = { intercept: 18500, pi_star: -1300, alpha: 2400, beta: -500 };
const SCATTER_CM1 = 120;
/** Absorbance noise of a bench instrument, σ = 0.002 (common practice, no source), rounded to 4 decimals as exported. */
const ABSORBANCE_NOISE = 0.002;

function makeDye(solvents: readonly TableSolvent[], seed: number) {
  const random = mulberry32(seed);
  return solvents.map((s) => {
    const p = s.parameters;
    const nuMax = TRUTH.intercept + TRUTH.pi_star * p.piStar! + TRUTH.alpha * p.alpha! + TRUTH.beta * p.beta! + SCATTER_CM1 * gaussian(random);
    const clean = formSpectrum([{ nuMax, fwhm: 3800, rho: 1.3, peak: 1.0 }]);
    const measured: SampledSpectrum = { wavelengths: clean.wavelengths, values: clean.values.map((v) => Math.round((v + ABSORBANCE_NOISE * gaussian(random)) * 1e4) / 1e4) };
    return { solvent: s, nuMax, spectrum: measured, lab: mixtureLab(clean, clean, 0) };
  });
}

const colourOf = (d: ReturnType<typeof makeDye>[number]): SolventColour => ({ solventId: d.solvent.solventId, solvent: d.solvent.solvent, parameters: d.solvent.parameters, lab: d.lab, replicates: 1 });
const spectraOf = (list: ReturnType<typeof makeDye>) => spectrumBandsBySolvent(list.map((d) => ({ solventId: d.solvent.solventId, lambdaMaxNm: lambdaMax(d.spectrum) })), TABLE);

describe("solvent model from measured spectra (log-normal bands on the real solvent table)", () => {
  const dye = makeDye(TABLE.slice(0, 20), 2024);
  const model = computeDyeModel({ dyeId: "dye_spectra", colours: dye.map(colourOf), table: TABLE, spectra: spectraOf(dye) });
  const kt = model.scales.find((s) => s.model === "kamlet-taft")!;

  it("fits Kamlet–Taft on the spectra alone (20 solvents ≥ 4 terms + 2) and says so", () => {
    expect(kt.source).toBe("spectrum");
    expect(kt.sourceNote).toMatch(/spectra in 20 solvents/);
    expect(kt.fit!.n).toBe(20);
    // Not mixed: every observation is the solvent's ν̃max = 10⁷/λmax, none an apparent band from colour.
    const fromSpectra = new Map(model.spectra.map((p) => [p.solvent, p.wavenumberCm1]));
    kt.fit!.solvents.forEach((name, i) => expect(kt.fit!.observed[i]).toBe(fromSpectra.get(name)));
    // The page's and the API's sentence say which source the numbers come from.
    expect(modelSentence(model)).toMatch(/Kamlet–Taft R² \d\.\d\d, on band maxima from spectra in 20 solvents/);
    expect(modelSummary(model).routes.find((r) => r.route === "band" && r.model === "kamlet-taft")).toMatchObject({ source: "spectrum" });
  });

  it("recovers s, a and b within two standard errors (95 %) of the generating law", () => {
    const fit = kt.fit!;
    for (const [term, value] of Object.entries(TRUTH)) {
      expect(Math.abs(fit.coefficients[term].value - value)).toBeLessThan(2 * fit.coefficients[term].stdErr);
    }
    // The standard errors are of the size the scatter implies, not inflated until anything passes.
    expect(fit.residualStdErr).toBeGreaterThan(0.6 * SCATTER_CM1);
    expect(fit.residualStdErr).toBeLessThan(1.5 * SCATTER_CM1);
  });

  it("measures the apparent band's offset above the true maximum (230–530 cm⁻¹ on ρ = 1.3 bands, lib/color/band.ts) and carries predictions to colour with it", () => {
    expect(kt.offset!.solvents).toBe(20);
    expect(kt.offset!.meanCm1).toBeGreaterThan(150);
    expect(kt.offset!.meanCm1).toBeLessThan(650);
    expect(kt.looDeltaE00).not.toBeNull();
    expect(model.chosen).not.toBeNull();
    const heldOut = makeDye(TABLE.slice(20), 77);
    const predicted = new Map(model.predictions.map((p) => [p.solventId, p]));
    for (const d of heldOut) {
      const p = predicted.get(d.solvent.solventId);
      if (!p || p.route !== "band") continue;
      // Prediction of the band maximum: within the 95 % interval widened by the scatter of the held-out point.
      expect(Math.abs(p.wavenumberCm1! - d.nuMax)).toBeLessThan(p.wavenumberHalfWidthCm1! + 3 * SCATTER_CM1);
    }
  });

  it("the colour route on the same data sits higher by about that offset (why the sources are not mixed)", () => {
    const coloursOnly = computeDyeModel({ dyeId: "dye_spectra", colours: dye.map(colourOf), table: TABLE });
    const ktColour = coloursOnly.scales.find((s) => s.model === "kamlet-taft")!;
    expect(ktColour.source).toBe("colour");
    const shift = ktColour.fit!.coefficients.intercept.value - kt.fit!.coefficients.intercept.value;
    expect(Math.abs(shift - kt.offset!.meanCm1)).toBeLessThan(400);
  });
});

describe("which source a scale is fitted on", () => {
  const dye = makeDye(TABLE.slice(0, 14), 31);
  // Spectra in 5 solvents only: too few for Kamlet–Taft (4 terms + 2 = 6), enough for f(εr) (2 terms + 2 = 4).
  const model = computeDyeModel({ dyeId: "dye_few", colours: dye.map(colourOf), table: TABLE, spectra: spectraOf(dye.slice(0, 5)) });

  it("fits Kamlet–Taft on colours and reports why", () => {
    const kt = model.scales.find((s) => s.model === "kamlet-taft")!;
    expect(kt.source).toBe("colour");
    expect(kt.sourceNote).toMatch(/spectra in 5 solvents .* at least 6 needed/);
    expect(kt.fit!.n).toBe(14);
  });

  it("fits the permittivity scale on the five spectra", () => {
    const perm = model.scales.find((s) => s.model === "permittivity")!;
    expect(perm.source).toBe("spectrum");
    expect(perm.fit!.n).toBe(5);
  });

  it("gives no band position for a spectrum without a visible band maximum", () => {
    const uvTail: SampledSpectrum = formSpectrum([{ nuMax: 31000, fwhm: 4000, rho: 1.3, peak: 1.5 }]);
    expect(lambdaMax(uvTail)).toBeNull();
    expect(spectrumBandsBySolvent([{ solventId: TABLE[0].solventId, lambdaMaxNm: lambdaMax(uvTail) }], TABLE)).toEqual([]);
  });
});
