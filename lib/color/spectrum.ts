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

/** The visible range in which a band maximum counts for λmax (CIE 015:2018 §2: visible radiation 380–780 nm). */
export const VISIBLE_NM: readonly [number, number] = [380, 780];

/**
 * Smallest prominence a local maximum needs to count as a band: 2 % of the largest absorbance in the
 * visible or 5 × the noise estimate, whichever is larger (common practice, no source).
 */
const MIN_PROMINENCE_FRACTION = 0.02;
const NOISE_FACTOR = 5;

/** Noise of a sampled spectrum from its second differences: σ ≈ 1.4826 · median|Δ²A| / √6 (MAD of white noise). */
export function noiseEstimate(a: readonly number[]): number {
  const d: number[] = [];
  for (let i = 1; i < a.length - 1; i++) d.push(Math.abs(a[i + 1] - 2 * a[i] + a[i - 1]));
  // Too few samples to tell noise from the band's own curvature.
  if (d.length < 10) return 0;
  d.sort((x, y) => x - y);
  return (1.4826 * d[Math.floor(d.length / 2)]) / Math.sqrt(6);
}

/**
 * Topographic prominence of the maximum at `i`: its height above the higher of the two lowest points
 * reached on either side before the spectrum climbs above it (or ends).
 */
function prominence(a: readonly number[], i: number): number {
  let leftMin = a[i];
  for (let j = i - 1; j >= 0 && a[j] <= a[i]; j--) leftMin = Math.min(leftMin, a[j]);
  let rightMin = a[i];
  for (let j = i + 1; j < a.length && a[j] <= a[i]; j++) rightMin = Math.min(rightMin, a[j]);
  return a[i] - Math.max(leftMin, rightMin);
}

/** Vertex of the parabola through the sample `i` and its neighbours (exact for unequal spacing too). */
function refinePeak(w: readonly number[], a: readonly number[], i: number): number {
  const [x0, x1, x2] = [w[i - 1], w[i], w[i + 1]];
  const [y0, y1, y2] = [a[i - 1], a[i], a[i + 1]];
  const d01 = (y1 - y0) / (x1 - x0);
  const d12 = (y2 - y1) / (x2 - x1);
  const curvature = (d12 - d01) / (x2 - x0);
  if (!(curvature < 0)) return x1;
  const vertex = (x0 + x1) / 2 - d01 / (2 * curvature);
  return Math.min(x2, Math.max(x0, vertex));
}

/**
 * λmax as solvatochromic scales define it: the maximum of the longest-wavelength absorption band in the
 * visible (Reichardt's E_T(30) is defined on that band; C. Reichardt, Chem. Rev. 94 (1994) 2319), not
 * the strongest band. A band maximum is an interior local maximum inside 380–780 nm (both neighbours
 * measured) that stands out from its surroundings by a prominence above noise (see
 * `MIN_PROMINENCE_FRACTION`); it is refined by the parabola through it and its two neighbours. A
 * spectrum with no band maximum in the visible (only a tail rising into the UV, or a flat baseline)
 * gives `null`: the range edge is not a band.
 */
export function lambdaMax(spectrum: SampledSpectrum): number | null {
  const { wavelengths: w, values: a } = spectrum;
  let maxVisible = 0;
  for (let i = 0; i < w.length; i++) if (w[i] >= VISIBLE_NM[0] && w[i] <= VISIBLE_NM[1]) maxVisible = Math.max(maxVisible, a[i]);
  const threshold = Math.max(MIN_PROMINENCE_FRACTION * maxVisible, NOISE_FACTOR * noiseEstimate(a), 1e-6);
  for (let i = w.length - 2; i >= 1; i--) {
    if (w[i] < VISIBLE_NM[0]) break;
    if (w[i] > VISIBLE_NM[1]) continue;
    // A flat top counts once, at its long-wavelength end.
    if (!(a[i] >= a[i - 1] && a[i] > a[i + 1])) continue;
    if (prominence(a, i) >= threshold) return refinePeak(w, a, i);
  }
  return null;
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
  /** Maximum of the longest-wavelength visible band; null when the spectrum has no band maximum in the visible. */
  lambdaMaxNm: number | null;
  /** E_T of that band, kcal/mol; null with λmax. */
  transitionEnergyKcalMol: number | null;
};

/** Colour of a solution from its absorbance spectrum (see `absorbanceToXyz`) plus λmax and E_T. */
export function spectrumColour(absorbance: SampledSpectrum, illuminant: WhitePointName, scale = 1): SpectrumColour {
  if (!Number.isFinite(scale) || scale < 0) throw new ColorInputError(`The scale ${scale} is not a non-negative number; give e.g. --scale 0.5 for half the concentration.`);
  const xyz = absorbanceToXyz(absorbance, illuminant, scale);
  const white = illuminantWhiteXyz(illuminant);
  const lab = xyzToLab(xyz, white);
  const hex = linearSrgbToHex(xyzD65ToLinearSrgb(illuminant === "D65" ? xyz : xyzToXyzD65(xyz, white)));
  const peak = lambdaMax(absorbance);
  return { xyz, lab, hex, lambdaMaxNm: peak, transitionEnergyKcalMol: peak === null ? null : transitionEnergyKcalMol(peak) };
}
