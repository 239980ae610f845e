/**
 * pH series of indicators generated the physical way, by a process DIFFERENT from the fit's model:
 * each form's spectrum is a sum of log-normal bands in wavenumber (skewed, as real electronic bands are:
 * D. B. Siano & D. E. Metzler, J. Chem. Phys. 51 (1969) 1856) with a vibronic shoulder, the two forms
 * are mixed per wavelength in absorbance (Beer–Lambert), and the colour is the CIE 015 summation of the
 * transmittance (lib/color/spectrum.ts, not the band model), with noise added in CIELAB.
 */
import { WHITE_POINTS_2DEG } from "@/lib/color/illuminants";
import { xyzToLab } from "@/lib/color/lab";
import type { PhPoint } from "@/lib/color/pka";
import { absorbanceToXyz, type SampledSpectrum } from "@/lib/color/spectrum";
import type { Lab } from "@/lib/color/types";
import { gaussian, mulberry32 } from "@/lib/random";

/** A log-normal band in wavenumber (Siano & Metzler 1969): maximum ν̃max, FWHM, skewness ρ (> 1: tail to high energy). */
export type LogNormalBand = { nuMax: number; fwhm: number; rho: number; peak: number };

export function logNormalAbsorbance(bands: readonly LogNormalBand[], nm: number): number {
  const nu = 1e7 / nm;
  let sum = 0;
  for (const { nuMax, fwhm, rho, peak } of bands) {
    const arg = 1 + ((nu - nuMax) * (rho * rho - 1)) / (fwhm * rho);
    if (arg <= 0) continue;
    const lnRho = Math.log(rho);
    sum += peak * Math.exp((-Math.LN2 / (lnRho * lnRho)) * Math.log(arg) ** 2);
  }
  return sum;
}

export function formSpectrum(bands: readonly LogNormalBand[]): SampledSpectrum {
  const wavelengths: number[] = [];
  const values: number[] = [];
  for (let nm = 300; nm <= 830; nm++) {
    wavelengths.push(nm);
    values.push(logNormalAbsorbance(bands, nm));
  }
  return { wavelengths, values };
}

/** Main band plus a vibronic shoulder 1,300 cm⁻¹ higher at 35 % height, peak absorbance `peak`. */
export function indicatorForm(lambdaMaxNm: number, peak: number, fwhm = 4200): LogNormalBand[] {
  const nu = 1e7 / lambdaMaxNm;
  return [
    { nuMax: nu, fwhm, rho: 1.3, peak },
    { nuMax: nu + 1300, fwhm: fwhm * 0.9, rho: 1.3, peak: 0.35 * peak },
  ];
}

export function mixtureLab(acid: SampledSpectrum, base: SampledSpectrum, f: number): Lab {
  return mixedFormsLab([acid, base], [1 - f, f]);
}

/** CIELAB D65 of forms mixed per wavelength in absorbance, form i at mole fraction weights[i]. */
export function mixedFormsLab(forms: readonly SampledSpectrum[], weights: readonly number[]): Lab {
  const mixed = { wavelengths: forms[0].wavelengths, values: forms[0].values.map((_, i) => forms.reduce((s, form, j) => s + weights[j] * form.values[i], 0)) };
  return xyzToLab(absorbanceToXyz(mixed, "D65"), WHITE_POINTS_2DEG.D65);
}

/** Vials at the given pHs with the forms' mole fractions from `fractionsAt`, Gaussian noise σ in each of L*, a*, b*. */
function seriesOf(forms: LogNormalBand[][], fractionsAt: (pH: number) => number[], pHs: readonly number[], sigma: number, seed: number): PhPoint[] {
  const random = mulberry32(seed);
  const spectra = forms.map(formSpectrum);
  return pHs.map((pH) => {
    const lab = mixedFormsLab(spectra, fractionsAt(pH));
    return { pH, lab: [lab[0] + sigma * gaussian(random), lab[1] + sigma * gaussian(random), lab[2] + sigma * gaussian(random)] as Lab };
  });
}

/** Vials at the given pHs, Henderson–Hasselbalch fractions for `pKa`, Gaussian noise σ in each of L*, a*, b*. */
export function indicatorSeries(acid: LogNormalBand[], base: LogNormalBand[], pKa: number, pHs: readonly number[], sigma: number, seed: number): PhPoint[] {
  return seriesOf([acid, base], (pH) => {
    const f = 1 / (1 + 10 ** (pKa - pH));
    return [1 - f, f];
  }, pHs, sigma, seed);
}

/**
 * A two-step indicator H2In ⇌ HIn⁻ ⇌ In²⁻: fractions [H⁺]² : [H⁺]·Ka1 : Ka1·Ka2 written out here in
 * concentrations (not the fit's logarithmic form), three log-normal forms mixed per wavelength.
 */
export function twoStepIndicatorSeries(forms: [LogNormalBand[], LogNormalBand[], LogNormalBand[]], pKa1: number, pKa2: number, pHs: readonly number[], sigma: number, seed: number): PhPoint[] {
  const ka1 = 10 ** -pKa1;
  const ka2 = 10 ** -pKa2;
  return seriesOf(forms, (pH) => {
    const h = 10 ** -pH;
    const d = h * h + h * ka1 + ka1 * ka2;
    return [(h * h) / d, (h * ka1) / d, (ka1 * ka2) / d];
  }, pHs, sigma, seed);
}
