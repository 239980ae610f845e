/**
 * pKa from absorption spectra measured at each pH: Beer–Lambert is linear in absorbance, so the whole
 * series is fitted at once, A(pH, λ) = (1 − f(pH))·A_acid(λ) + f(pH)·A_base(λ) with f the
 * Henderson–Hasselbalch base fraction, across every wavelength (global analysis of a spectrophotometric
 * titration: common practice, no single source). For a trial pKa the two spectra follow by linear least squares at each
 * wavelength; pKa minimises the total squared residual (grid, then golden-section search).
 *
 * Checks: an SVD of the absorbance matrix says how many independent spectra the series holds (two
 * species → two singular values above the noise level, whose bound for an n × m matrix of white noise
 * of standard deviation σ is about σ(√n + √m): the largest singular value of such a matrix, a
 * random-matrix result, e.g. A. Edelman, SIAM J. Matrix Anal. Appl. 9 (1988) 543); isosbestic points
 * are the wavelengths where the fitted acid and base spectra cross.
 */
import { SingularValueDecomposition, Matrix } from "ml-matrix";
import { ColorInputError } from "./errors";
import { goldenSection } from "./nelder-mead";
import { baseFraction } from "./pka";
import { interpolateAt, noiseEstimate, type SampledSpectrum } from "./spectrum";
import { mulberry32 } from "../random";

export type SpectrumAtPh = { pH: number; spectrum: SampledSpectrum };

export type SpectraPkaFlag = "more-than-two-species" | "no-change" | "acid-plateau-missing" | "base-plateau-missing";

export type SpectraPkaFit = {
  method: "global-absorbance-fit";
  pKa: number;
  /** Bootstrap over the pH points (resampled with replacement). */
  pKaStdErr: number;
  wavelengths: number[];
  acidSpectrum: number[];
  baseSpectrum: number[];
  /** Root mean square absorbance residual of the global fit. */
  rmsResidual: number;
  singularValues: number[];
  /** Noise level the singular values are compared with: σ(√n + √m). */
  noiseThreshold: number;
  /** Number of singular values above the threshold (2 for a clean two-species series). */
  species: number;
  /** Wavelengths (nm) where the two forms absorb equally, with the absorbance there. */
  isosbesticPoints: { nm: number; absorbance: number }[];
  flags: SpectraPkaFlag[];
  messages: string[];
};

type Forms = { acid: Float64Array; base: Float64Array; rss: number };

function formsFor(pKa: number, pHs: readonly number[], rows: readonly Float64Array[]): Forms {
  const m = rows[0].length;
  const fs = pHs.map((pH) => baseFraction(pH, pKa));
  let s00 = 0;
  let s01 = 0;
  let s11 = 0;
  for (const f of fs) {
    s00 += (1 - f) ** 2;
    s01 += (1 - f) * f;
    s11 += f * f;
  }
  const det = s00 * s11 - s01 * s01;
  const acid = new Float64Array(m);
  const base = new Float64Array(m);
  let rss = 0;
  for (let j = 0; j < m; j++) {
    let t0 = 0;
    let t1 = 0;
    for (let i = 0; i < fs.length; i++) {
      t0 += (1 - fs[i]) * rows[i][j];
      t1 += fs[i] * rows[i][j];
    }
    acid[j] = (s11 * t0 - s01 * t1) / det;
    base[j] = (s00 * t1 - s01 * t0) / det;
    for (let i = 0; i < fs.length; i++) rss += (rows[i][j] - ((1 - fs[i]) * acid[j] + fs[i] * base[j])) ** 2;
  }
  return { acid, base, rss: Math.abs(det) > 1e-12 ? rss : Infinity };
}

function bestPka(pHs: readonly number[], rows: readonly Float64Array[], lo: number, hi: number, step: number): number {
  let best = lo;
  let bestRss = Infinity;
  for (let p = lo; p <= hi + 1e-9; p += step) {
    const { rss } = formsFor(p, pHs, rows);
    if (rss < bestRss) {
      bestRss = rss;
      best = p;
    }
  }
  return goldenSection((p) => formsFor(p, pHs, rows).rss, best - step, best + step, 1e-5).x;
}

/** Global fit of one acid–base step to absorption spectra at several pH values. See the module comment. */
export function fitPkaFromSpectra(series: readonly SpectrumAtPh[], opts: { bootstrapRuns?: number } = {}): SpectraPkaFit {
  if (series.length < 5) throw new ColorInputError(`A pKa fit needs spectra at 5 or more pH values and ${series.length} were given; measure more pH values.`);
  if (new Set(series.map((s) => s.pH)).size < 4) throw new ColorInputError("The spectra cover fewer than 4 different pH values; spread them over the transition.");
  const from = Math.max(...series.map((s) => s.spectrum.wavelengths[0]));
  const to = Math.min(...series.map((s) => s.spectrum.wavelengths[s.spectrum.wavelengths.length - 1]));
  if (!(to > from)) throw new ColorInputError("The spectra share no wavelength range; measure them over the same range.");
  const wavelengths = series[0].spectrum.wavelengths.filter((w) => w >= from && w <= to);
  const rows = series.map((s) => Float64Array.from(wavelengths, (w) => interpolateAt(s.spectrum, w)));
  const pHs = series.map((s) => s.pH);
  const n = rows.length;
  const m = wavelengths.length;

  const svd = new SingularValueDecomposition(new Matrix(rows.map((r) => Array.from(r))), { autoTranspose: true, computeLeftSingularVectors: false, computeRightSingularVectors: false });
  const singularValues = svd.diagonal;
  const sigma = series.map((s) => noiseEstimate(s.spectrum.values)).sort((a, b) => a - b)[Math.floor(n / 2)];
  // Floor: a noiseless series still has rounding in its last digits.
  const noiseThreshold = Math.max(sigma, 1e-4 * singularValues[0]) * (Math.sqrt(n) + Math.sqrt(m));
  const species = singularValues.filter((s) => s > noiseThreshold).length;

  const lo = Math.min(...pHs);
  const hi = Math.max(...pHs);
  const pKa = bestPka(pHs, rows, lo - 1, hi + 1, 0.02);
  const forms = formsFor(pKa, pHs, rows);
  const rmsResidual = Math.sqrt(forms.rss / (n * m));

  const runs = opts.bootstrapRuns ?? 100;
  const random = mulberry32(0x5bec + n);
  const boot: number[] = [];
  for (let b = 0; b < runs; b++) {
    const idx = rows.map(() => Math.floor(random() * n));
    const p = idx.map((i) => pHs[i]);
    if (new Set(p).size < 4) continue;
    boot.push(goldenSection((x) => formsFor(x, p, idx.map((i) => rows[i])).rss, pKa - 1, pKa + 1, 1e-5).x);
  }
  const mean = boot.reduce((s, v) => s + v, 0) / Math.max(1, boot.length);
  const pKaStdErr = boot.length > 1 ? Math.sqrt(boot.reduce((s, v) => s + (v - mean) ** 2, 0) / (boot.length - 1)) : Number.NaN;

  // Isosbestic points: sign changes of A_acid − A_base where both absorb noticeably.
  const top = Math.max(...forms.acid, ...forms.base);
  const isosbesticPoints: { nm: number; absorbance: number }[] = [];
  for (let j = 1; j < m; j++) {
    const d0 = forms.acid[j - 1] - forms.base[j - 1];
    const d1 = forms.acid[j] - forms.base[j];
    if (d0 === 0 || Math.sign(d0) === Math.sign(d1)) continue;
    const t = d0 / (d0 - d1);
    const nm = wavelengths[j - 1] + t * (wavelengths[j] - wavelengths[j - 1]);
    const absorbance = forms.acid[j - 1] + t * (forms.acid[j] - forms.acid[j - 1]);
    if (absorbance > 0.05 * top) isosbesticPoints.push({ nm, absorbance });
  }

  const flags: SpectraPkaFlag[] = [];
  const messages: string[] = [];
  if (species > 2) {
    flags.push("more-than-two-species");
    messages.push(`The spectra hold ${species} independent components above the noise, not 2: a second equilibrium, a drifting baseline or decomposition; a single pKa does not describe them.`);
  }
  if (species < 2) {
    flags.push("no-change");
    messages.push("The spectra do not change shape with pH beyond the noise; no pKa can be read from them.");
  }
  if (baseFraction(lo, pKa) > 0.1) {
    flags.push("acid-plateau-missing");
    messages.push(`No spectrum shows the acid form alone; add spectra below pH ${(pKa - 1.5).toFixed(1)}.`);
  }
  if (baseFraction(hi, pKa) < 0.9) {
    flags.push("base-plateau-missing");
    messages.push(`No spectrum shows the base form alone; add spectra above pH ${(pKa + 1.5).toFixed(1)}.`);
  }
  return {
    method: "global-absorbance-fit",
    pKa,
    pKaStdErr,
    wavelengths,
    acidSpectrum: Array.from(forms.acid),
    baseSpectrum: Array.from(forms.base),
    rmsResidual,
    singularValues,
    noiseThreshold,
    species,
    isosbesticPoints,
    flags,
    messages,
  };
}
