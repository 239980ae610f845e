import { CIE1931_2DEG_CMF, CIE_ILLUMINANT_A, CIE_ILLUMINANT_D50, CIE_ILLUMINANT_D65 } from "./data/cie-tables";
import type { WhitePointName } from "./illuminants";
import { xyzToXyzD65 } from "./convert";
import { parseNumericCsv } from "./csv";
import { ColorInputError } from "./errors";
import { xyzToLab } from "./lab";
import { linearSrgbToHex, xyzD65ToLinearSrgb } from "./srgb";
import type { Lab, Xyz } from "./types";

const ILLUMINANT_SPD: Record<WhitePointName, readonly (readonly [number, number])[]> = {
  D65: CIE_ILLUMINANT_D65,
  D50: CIE_ILLUMINANT_D50,
  A: CIE_ILLUMINANT_A,
};

/** A sampled spectrum: ascending wavelengths (nm) and values. */
export type SampledSpectrum = { wavelengths: number[]; values: number[] };

/** Linear interpolation, holding the end values outside the sampled range (CIE 015:2018 §7.2.2 practice). */
export function interpolateAt(spectrum: SampledSpectrum, nm: number): number {
  const { wavelengths: w, values: v } = spectrum;
  if (nm <= w[0]) return v[0];
  if (nm >= w[w.length - 1]) return v[v.length - 1];
  let lo = 0;
  let hi = w.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (w[mid] <= nm) lo = mid;
    else hi = mid;
  }
  const t = (nm - w[lo]) / (w[hi] - w[lo]);
  return v[lo] + t * (v[hi] - v[lo]);
}

/**
 * Per-wavelength tristimulus weights k·S(λ)·x̄(λ), k·S(λ)·ȳ(λ), k·S(λ)·z̄(λ) at 1 nm over 360–830 nm for a
 * CIE illuminant and the CIE 1931 2° observer, with k = 100 / Σ S(λ) ȳ(λ) (CIE 015:2018 §7.1), so that
 * X = Σ T(λ)·wx(λ) and a perfect transmitter has Y = 100. Computed once per illuminant.
 */
export type TristimulusWeights = { wavelengths: Float64Array; wx: Float64Array; wy: Float64Array; wz: Float64Array };
const weightCache = new Map<WhitePointName, TristimulusWeights>();

export function tristimulusWeights(illuminant: WhitePointName): TristimulusWeights {
  const cached = weightCache.get(illuminant);
  if (cached) return cached;
  const spd = ILLUMINANT_SPD[illuminant];
  const spdStart = spd[0][0];
  const n = CIE1931_2DEG_CMF.length;
  const w: TristimulusWeights = { wavelengths: new Float64Array(n), wx: new Float64Array(n), wy: new Float64Array(n), wz: new Float64Array(n) };
  let norm = 0;
  CIE1931_2DEG_CMF.forEach(([nm, xb, yb, zb], i) => {
    const s = spd[nm - spdStart][1];
    w.wavelengths[i] = nm;
    w.wx[i] = s * xb;
    w.wy[i] = s * yb;
    w.wz[i] = s * zb;
    norm += s * yb;
  });
  const k = 100 / norm;
  for (let i = 0; i < n; i++) {
    w.wx[i] *= k;
    w.wy[i] *= k;
    w.wz[i] *= k;
  }
  weightCache.set(illuminant, w);
  return w;
}

/**
 * Tristimulus values of a transmitting (or reflecting) sample under a CIE illuminant, CIE 1931 2°
 * observer, by the CIE 015:2018 summation at 1 nm over 360–830 nm:
 * X = k Σ S(λ) T(λ) x̄(λ), k = 100 / Σ S(λ) ȳ(λ), so a perfect transmitter has Y = 100.
 * `transmittanceAt` gives T(λ) in 0–1 at each integer wavelength.
 */
export function transmittanceToXyz(transmittanceAt: (nm: number) => number, illuminant: WhitePointName): Xyz {
  const { wavelengths, wx, wy, wz } = tristimulusWeights(illuminant);
  let x = 0;
  let y = 0;
  let z = 0;
  for (let i = 0; i < wavelengths.length; i++) {
    const t = transmittanceAt(wavelengths[i]);
    x += t * wx[i];
    y += t * wy[i];
    z += t * wz[i];
  }
  return [x, y, z];
}

/** XYZ of a decadic absorbance spectrum, T = 10^(−A·scale) (Beer–Lambert scaling by `scale`). */
export function absorbanceToXyz(absorbance: SampledSpectrum, illuminant: WhitePointName, scale = 1): Xyz {
  return transmittanceToXyz((nm) => Math.pow(10, -scale * interpolateAt(absorbance, nm)), illuminant);
}

/** Tristimulus values of the illuminant itself (a perfect transmitter), Y = 100: the CIELAB white. */
export function illuminantWhiteXyz(illuminant: WhitePointName): Xyz {
  return transmittanceToXyz(() => 1, illuminant);
}

/**
 * Reads an absorbance CSV: a header row naming the columns `wavelength_nm` and `absorbance` (any
 * order, other columns ignored), then one sample per row. Blank lines are skipped; rows are sorted
 * by wavelength. Throws `ColorInputError` with the offending line for anything malformed.
 */
export function parseAbsorbanceCsv(text: string): SampledSpectrum {
  const rows = parseNumericCsv(text, ["wavelength_nm", "absorbance"], "spectrum");
  if (rows.length < 2) throw new ColorInputError("The spectrum has fewer than two rows of data; give the absorbance at two or more wavelengths.");
  rows.sort((p, q) => p[0] - q[0]);
  for (let i = 1; i < rows.length; i++) {
    if (rows[i][0] === rows[i - 1][0]) throw new ColorInputError(`The spectrum lists ${rows[i][0]} nm twice; keep one absorbance per wavelength.`);
  }
  if (rows[0][0] <= 0) throw new ColorInputError(`The spectrum has a wavelength of ${rows[0][0]} nm; wavelengths are in nanometres and must be positive.`);
  if (rows[rows.length - 1][0] < 360 || rows[0][0] > 830) {
    throw new ColorInputError(`The spectrum covers ${rows[0][0]}–${rows[rows.length - 1][0]} nm, outside the visible 360–830 nm; measure the visible range.`);
  }
  return { wavelengths: rows.map((r) => r[0]), values: rows.map((r) => r[1]) };
}

/**
 * Wavelength of maximum absorbance in the visible range (360–830 nm), where the band that gives the
 * colour lies. The highest sample that is a local maximum is refined by the vertex of the parabola
 * through it and its two neighbours (exact for unequal spacing too); if the absorbance only rises
 * towards an end of the range, the highest sample there is returned unrefined.
 */
export function lambdaMax(spectrum: SampledSpectrum): number {
  const { wavelengths: w, values: a } = spectrum;
  let best = -1;
  let bestEdge = -1;
  for (let i = 0; i < w.length; i++) {
    if (w[i] < 360 || w[i] > 830) continue;
    const interior = i > 0 && i < w.length - 1 && a[i] >= a[i - 1] && a[i] >= a[i + 1] && (a[i] > a[i - 1] || a[i] > a[i + 1]);
    if (interior && (best < 0 || a[i] > a[best])) best = i;
    if (bestEdge < 0 || a[i] > a[bestEdge]) bestEdge = i;
  }
  if (best < 0) return w[bestEdge];
  const [x0, x1, x2] = [w[best - 1], w[best], w[best + 1]];
  const [y0, y1, y2] = [a[best - 1], a[best], a[best + 1]];
  const d01 = (y1 - y0) / (x1 - x0);
  const d12 = (y2 - y1) / (x2 - x1);
  const curvature = (d12 - d01) / (x2 - x0);
  if (!(curvature < 0)) return x1;
  const vertex = (x0 + x1) / 2 - d01 / (2 * curvature);
  return Math.min(x2, Math.max(x0, vertex));
}

/**
 * Molar transition energy of the band at λmax: E_T = h c N_A / λ = 28591 / λ(nm) kcal/mol
 * (Reichardt's E_T(30) definition, C. Reichardt, Chem. Rev. 94 (1994) 2319).
 */
export function transitionEnergyKcalMol(lambdaNm: number): number {
  return 28591 / lambdaNm;
}

export type SpectrumColour = {
  xyz: Xyz;
  /** CIELAB relative to the illuminant's own white (the perfect transmitter under it). */
  lab: Lab;
  /** Display swatch: XYZ Bradford-adapted to D65, clipped into sRGB. */
  hex: string;
  lambdaMaxNm: number;
  transitionEnergyKcalMol: number;
};

/** Colour of a solution from its absorbance spectrum (see `absorbanceToXyz`) plus λmax and E_T. */
export function spectrumColour(absorbance: SampledSpectrum, illuminant: WhitePointName, scale = 1): SpectrumColour {
  if (!Number.isFinite(scale) || scale < 0) throw new ColorInputError(`The scale ${scale} is not a non-negative number; give e.g. --scale 0.5 for half the concentration.`);
  const xyz = absorbanceToXyz(absorbance, illuminant, scale);
  const white = illuminantWhiteXyz(illuminant);
  const lab = xyzToLab(xyz, white);
  const hex = linearSrgbToHex(xyzD65ToLinearSrgb(illuminant === "D65" ? xyz : xyzToXyzD65(xyz, white)));
  const peak = lambdaMax(absorbance);
  return { xyz, lab, hex, lambdaMaxNm: peak, transitionEnergyKcalMol: transitionEnergyKcalMol(peak) };
}
