/**
 * The band model: a dye's colour ↔ one absorption band.
 *
 * Solvent scales (ET(30), Kamlet–Taft α, β, π*) are linear in the transition energy of a dye's
 * longest-wavelength band, not in CIELAB. To fit them to colours known only from photographs, each
 * colour is mapped to an *apparent band*: the single absorption band whose colour, computed the CIE way
 * (transmittance T = 10^(−A), CIE 015:2018 1 nm summation, CIE 1931 2° observer, under the
 * measurement's illuminant), matches the measured CIELAB. The same model gives the two forms of an
 * acid/base indicator, mixed per wavelength in absorbance (Beer–Lambert), and carries a predicted band
 * position back to a colour.
 *
 * Band shape: a Gaussian in wavenumber, A(ν̃) = A_peak · exp(−4 ln 2 · (ν̃ − ν̃max)² / w²), w the full width
 * at half maximum. A Gaussian in energy is the usual first approximation of a broad electronic band
 * (common practice); real bands are skewed towards high energy (log-normal shape, D. B. Siano &
 * D. E. Metzler, "Band shapes of the electronic spectra of complex molecules", J. Chem. Phys. 51 (1969)
 * 1856–1861), so an apparent band's position is that of the Gaussian with the same colour. On log-normal
 * bands of skewness 1.3 it sits 230–530 cm⁻¹ above the true maximum (towards the centroid), a nearly
 * constant offset that a solvent-scale fit takes into its intercept (tests/unit/color-band.test.ts).
 *
 * Limits: three numbers (L*, a*, b*) fix at most three band parameters, so every colour a single band can
 * make is matched; colours no single band makes (a green needs absorption at both ends of the spectrum)
 * are reported as "not-one-band" once the best band is further than `BAND_LIMITS.maxDeltaE00`; colours
 * with little chroma say little about where the band is and are reported as "too-pale". Yellow colours
 * place the band less precisely than red or blue ones: a band near the violet edge trades position for
 * strength. Fitting several colours of one dye with a shared width and strength
 * (`fitApparentBandsShared`) removes most of that trade-off.
 */
import { deltaE00 } from "./difference";
import type { WhitePointName } from "./illuminants";
import { xyzToLab, labToLch } from "./lab";
import { goldenSection, nelderMead } from "./nelder-mead";
import { tristimulusWeights, type SampledSpectrum } from "./spectrum";
import type { Lab, Xyz } from "./types";

/** One absorption band, Gaussian in wavenumber. */
export type AbsorptionBand = { wavenumberCm1: number; fwhmCm1: number; peakAbsorbance: number };

/**
 * Search ranges and decision limits of the apparent-band fit. The ranges cover visible-light dyes
 * (band maxima 370–800 nm; half-widths of solution spectra about 1,500–9,000 cm⁻¹; peak absorbance of a
 * vial worth photographing 0.02–4): our choice, no source. `maxDeltaE00` = 3: a colour further than
 * that from every single band is not explained by one (our limit, chosen above the 1–2 ΔE00 of a
 * calibrated photograph; no source). `minChroma` = 4 C*ab units: below it the hue, and with it the band
 * position, is not defined well enough (our limit, no source).
 */
export const BAND_LIMITS = {
  minWavenumberCm1: 12_500,
  maxWavenumberCm1: 27_000,
  minFwhmCm1: 1_500,
  maxFwhmCm1: 9_000,
  minPeakAbsorbance: 0.02,
  maxPeakAbsorbance: 4,
  maxDeltaE00: 3,
  minChroma: 4,
} as const;

export const wavenumberCm1ToNm = (nu: number): number => 1e7 / nu;
export const nmToWavenumberCm1 = (nm: number): number => 1e7 / nm;

/** Molar transition energy E_T = h c N_A ν̃ = 28591 / λ(nm) kcal/mol = 2.8591 × 10⁻³ · ν̃(cm⁻¹) (Reichardt's E_T(30) definition). */
export function wavenumberCm1ToKcalMol(nu: number): number {
  return (28591 * nu) / 1e7;
}

const FOUR_LN2 = 4 * Math.LN2;
const LN10 = Math.LN10;

function asArray(bands: AbsorptionBand | readonly AbsorptionBand[]): readonly AbsorptionBand[] {
  return Array.isArray(bands) ? bands : [bands as AbsorptionBand];
}

/** Decadic absorbance of the band(s) at a wavelength (nm). */
export function bandAbsorbanceAt(bands: AbsorptionBand | readonly AbsorptionBand[], nm: number): number {
  const nu = 1e7 / nm;
  let a = 0;
  for (const b of asArray(bands)) {
    const d = (nu - b.wavenumberCm1) / b.fwhmCm1;
    a += b.peakAbsorbance * Math.exp(-FOUR_LN2 * d * d);
  }
  return a;
}

/** The band(s) sampled as an absorbance spectrum, 360–830 nm at 1 nm unless told otherwise. */
export function bandSpectrum(
  bands: AbsorptionBand | readonly AbsorptionBand[],
  opts: { fromNm?: number; toNm?: number; stepNm?: number } = {},
): SampledSpectrum {
  const from = opts.fromNm ?? 360;
  const to = opts.toNm ?? 830;
  const step = opts.stepNm ?? 1;
  const wavelengths: number[] = [];
  const values: number[] = [];
  for (let nm = from; nm <= to + 1e-9; nm += step) {
    wavelengths.push(nm);
    values.push(bandAbsorbanceAt(bands, nm));
  }
  return { wavelengths, values };
}

type Grid = { nu: Float64Array; wx: Float64Array; wy: Float64Array; wz: Float64Array; white: Xyz };
const grids = new Map<WhitePointName, Grid>();

function grid(illuminant: WhitePointName): Grid {
  let g = grids.get(illuminant);
  if (!g) {
    const w = tristimulusWeights(illuminant);
    const nu = new Float64Array(w.wavelengths.length);
    let wxSum = 0;
    let wzSum = 0;
    for (let i = 0; i < nu.length; i++) {
      nu[i] = 1e7 / w.wavelengths[i];
      wxSum += w.wx[i];
      wzSum += w.wz[i];
    }
    g = { nu, wx: w.wx, wy: w.wy, wz: w.wz, white: [wxSum, 100, wzSum] };
    grids.set(illuminant, g);
  }
  return g;
}

/** Sum over the 1 nm grid of T(λ)·weights, with the absorbance given per grid index. */
function xyzOf(g: Grid, absorbanceAt: (i: number) => number): Xyz {
  let x = 0;
  let y = 0;
  let z = 0;
  for (let i = 0; i < g.nu.length; i++) {
    const t = Math.exp(-LN10 * absorbanceAt(i));
    x += t * g.wx[i];
    y += t * g.wy[i];
    z += t * g.wz[i];
  }
  return [x, y, z];
}

/**
 * The same sum for one band, written out for the fits' inner loop: T − 1 is added only where the band
 * absorbs (beyond 4.5 half-widths a Gaussian is below 10⁻²⁴ of its peak), starting from the white.
 */
function oneBandXyz(g: Grid, nu0: number, fwhm: number, peak: number): Xyz {
  let x = g.white[0];
  let y = g.white[1];
  let z = g.white[2];
  const reach = 4.5 * fwhm;
  const k = -FOUR_LN2 / (fwhm * fwhm);
  const nu = g.nu;
  for (let i = 0; i < nu.length; i++) {
    const d = nu[i] - nu0;
    if (d > reach || d < -reach) continue;
    const t1 = Math.exp(-LN10 * peak * Math.exp(k * d * d)) - 1;
    x += t1 * g.wx[i];
    y += t1 * g.wy[i];
    z += t1 * g.wz[i];
  }
  return [x, y, z];
}

function absorbanceOn(g: Grid, bands: readonly AbsorptionBand[], i: number): number {
  const nu = g.nu[i];
  let a = 0;
  for (const b of bands) {
    const d = (nu - b.wavenumberCm1) / b.fwhmCm1;
    a += b.peakAbsorbance * Math.exp(-FOUR_LN2 * d * d);
  }
  return a;
}

/** Tristimulus values (Y = 100 for a perfect transmitter) of the light transmitted through the band(s). */
export function bandXyz(bands: AbsorptionBand | readonly AbsorptionBand[], illuminant: WhitePointName = "D65"): Xyz {
  const g = grid(illuminant);
  const list = asArray(bands);
  if (list.length === 1) return oneBandXyz(g, list[0].wavenumberCm1, list[0].fwhmCm1, list[0].peakAbsorbance);
  return xyzOf(g, (i) => absorbanceOn(g, list, i));
}

/**
 * CIELAB of the light transmitted through the band(s), relative to the illuminant's own white (the
 * perfect transmitter under it), as `spectrumColour` in ./spectrum computes it for a measured spectrum.
 */
export function bandLab(bands: AbsorptionBand | readonly AbsorptionBand[], illuminant: WhitePointName = "D65"): Lab {
  return xyzToLab(bandXyz(bands, illuminant), grid(illuminant).white);
}

/**
 * CIELAB of a per-wavelength mixture of two forms of one dye, T(λ) = 10^−((1−f)·A₁(λ) + f·A₂(λ)), f the
 * fraction in form 2 (Beer–Lambert: absorbances of species add at each wavelength, not per camera channel).
 */
export function mixedBandLab(
  form1: readonly AbsorptionBand[],
  form2: readonly AbsorptionBand[],
  fraction2: number,
  illuminant: WhitePointName = "D65",
): Lab {
  const g = grid(illuminant);
  const f = Math.min(1, Math.max(0, fraction2));
  const xyz = xyzOf(g, (i) => (1 - f) * absorbanceOn(g, form1, i) + f * absorbanceOn(g, form2, i));
  return xyzToLab(xyz, g.white);
}

export type ApparentBandStatus = "ok" | "not-one-band" | "too-pale";
export type ApparentBand = {
  band: AbsorptionBand;
  /** Colour of the fitted band under the same illuminant. */
  modelLab: Lab;
  /** CIEDE2000 between `modelLab` and the colour fitted. */
  deltaE00: number;
  status: ApparentBandStatus;
  /** One sentence for the person when status is not "ok". */
  message?: string;
};

type BandFitOptions = { illuminant?: WhitePointName; fwhmCm1?: number; peakAbsorbance?: number; maxDeltaE00?: number };

const L = BAND_LIMITS;
const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));
/** Distance outside the box, added as a penalty so the simplex comes back inside. */
const outside = (v: number, lo: number, hi: number) => (v < lo ? lo - v : v > hi ? v - hi : 0);

function statusOf(lab: Lab, fit: { band: AbsorptionBand; deltaE00: number }, maxDeltaE00: number): Pick<ApparentBand, "status" | "message"> {
  const chroma = labToLch(lab)[1];
  if (chroma < L.minChroma || fit.band.peakAbsorbance <= L.minPeakAbsorbance * 1.01) {
    return {
      status: "too-pale",
      message: `The colour is too pale (C*ab ${chroma.toFixed(1)}, below ${L.minChroma}) to place an absorption band; measure a more concentrated solution or a longer path.`,
    };
  }
  if (fit.deltaE00 > maxDeltaE00) {
    return {
      status: "not-one-band",
      message: `No single absorption band gives this colour (the closest is ΔE00 ${fit.deltaE00.toFixed(1)} away, limit ${maxDeltaE00}); the dye probably absorbs in two regions.`,
    };
  }
  return { status: "ok" };
}

/**
 * The single band (position, width, peak absorbance) whose colour best matches `lab` (minimum ΔE00), by
 * a coarse grid over the search ranges followed by Nelder–Mead from the best distinct starts. Width
 * and/or peak absorbance may be fixed (e.g. to a dye's own values). `lab` is relative to the white of
 * `illuminant` (D65 default). Never throws for a colour: the status says whether the band means anything.
 */
export function fitApparentBand(lab: Lab, opts: BandFitOptions = {}): ApparentBand {
  const illuminant = opts.illuminant ?? "D65";
  const maxDeltaE00 = opts.maxDeltaE00 ?? L.maxDeltaE00;
  const fixedW = opts.fwhmCm1;
  const fixedP = opts.peakAbsorbance;
  // Parameters: ν̃ in kK, ln(width in kK), ln(peak), each only when not fixed.
  const decode = (x: readonly number[]) => {
    let k = 0;
    const nuKk = x[k++];
    const lnW = fixedW === undefined ? x[k++] : Math.log(fixedW / 1000);
    const lnP = fixedP === undefined ? x[k++] : Math.log(fixedP);
    return { nuKk, lnW, lnP };
  };
  const bandOf = (p: { nuKk: number; lnW: number; lnP: number }): AbsorptionBand => ({
    wavenumberCm1: clamp(p.nuKk * 1000, L.minWavenumberCm1, L.maxWavenumberCm1),
    fwhmCm1: clamp(Math.exp(p.lnW) * 1000, L.minFwhmCm1, L.maxFwhmCm1),
    peakAbsorbance: clamp(Math.exp(p.lnP), L.minPeakAbsorbance, L.maxPeakAbsorbance),
  });
  const objective = (x: readonly number[]) => {
    const p = decode(x);
    const penalty =
      outside(p.nuKk * 1000, L.minWavenumberCm1, L.maxWavenumberCm1) / 100 +
      outside(p.lnW, Math.log(L.minFwhmCm1 / 1000), Math.log(L.maxFwhmCm1 / 1000)) * 10 +
      outside(p.lnP, Math.log(L.minPeakAbsorbance), Math.log(L.maxPeakAbsorbance)) * 10;
    return deltaE00(bandLab(bandOf(p), illuminant), lab) + penalty;
  };
  const encode = (nuKk: number, w: number, pk: number) => {
    const x = [nuKk];
    if (fixedW === undefined) x.push(Math.log(w));
    if (fixedP === undefined) x.push(Math.log(pk));
    return x;
  };

  const starts: { x: number[]; value: number }[] = [];
  const widths = fixedW === undefined ? [2.5, 4, 6] : [fixedW / 1000];
  const peaks = fixedP === undefined ? [0.2, 0.7, 2] : [fixedP];
  for (let nuKk = L.minWavenumberCm1 / 1000; nuKk <= L.maxWavenumberCm1 / 1000 + 1e-9; nuKk += 0.5) {
    for (const w of widths) for (const pk of peaks) {
      const x = encode(nuKk, w, pk);
      starts.push({ x, value: objective(x) });
    }
  }
  starts.sort((p, q) => p.value - q.value);
  const chosen: { x: number[]; value: number }[] = [];
  for (const s of starts) {
    if (chosen.every((c) => Math.abs(c.x[0] - s.x[0]) > 1)) chosen.push(s);
    if (chosen.length === 3) break;
  }
  let best = { x: chosen[0].x, value: chosen[0].value };
  for (const s of chosen) {
    const r = nelderMead(objective, s.x, { step: s.x.map((_, i) => (i === 0 ? 0.4 : 0.2)), fTol: 1e-5, xTol: 1e-4, maxIterations: 400 });
    if (r.value < best.value) best = { x: r.x, value: r.value };
  }
  const band = bandOf(decode(best.x));
  const modelLab = bandLab(band, illuminant);
  const dE = deltaE00(modelLab, lab);
  return { band, modelLab, deltaE00: dE, ...statusOf(lab, { band, deltaE00: dE }, maxDeltaE00) };
}

/**
 * Several colours of one dye (e.g. in a panel of solvents): one band width and peak absorbance shared by
 * all, one position per colour, minimising Σ ΔE00². Sharing is what a dye whose band moves but keeps its
 * shape does, and it pins the position of yellow colours that a free fit places loosely. Too-pale colours
 * are fitted for their position afterwards but do not steer the shared width and strength.
 */
export function fitApparentBandsShared(
  labs: readonly Lab[],
  opts: { illuminant?: WhitePointName; maxDeltaE00?: number } = {},
): { fwhmCm1: number; peakAbsorbance: number; bands: ApparentBand[] } {
  const illuminant = opts.illuminant ?? "D65";
  const maxDeltaE00 = opts.maxDeltaE00 ?? L.maxDeltaE00;
  if (labs.length === 0) return { fwhmCm1: NaN, peakAbsorbance: NaN, bands: [] };
  const single = labs.map((lab) => fitApparentBand(lab, { illuminant, maxDeltaE00 }));
  const steering = single.map((s, i) => (s.status === "too-pale" ? -1 : i)).filter((i) => i >= 0);
  const use = steering.length > 0 ? steering : labs.map((_, i) => i);
  const median = (v: number[]) => {
    const s = [...v].sort((p, q) => p - q);
    return s[Math.floor(s.length / 2)];
  };
  const positions = single.map((s) => s.band.wavenumberCm1 / 1000);

  const bestPosition = (lab: Lab, i: number, w: number, pk: number) => {
    const f = (nuKk: number) =>
      deltaE00(bandLab({ wavenumberCm1: nuKk * 1000, fwhmCm1: w, peakAbsorbance: pk }, illuminant), lab);
    const lo = Math.max(L.minWavenumberCm1 / 1000, positions[i] - 1.2);
    const hi = Math.min(L.maxWavenumberCm1 / 1000, positions[i] + 1.2);
    return goldenSection(f, lo, hi, 2e-3);
  };
  const shapeOf = (x: readonly number[]) => ({
    w: clamp(Math.exp(x[0]) * 1000, L.minFwhmCm1, L.maxFwhmCm1),
    pk: clamp(Math.exp(x[1]), L.minPeakAbsorbance, L.maxPeakAbsorbance),
  });
  const objective = (x: readonly number[]) => {
    const { w, pk } = shapeOf(x);
    let sum = 0;
    for (const i of use) {
      const r = bestPosition(labs[i], i, w, pk);
      positions[i] = r.x;
      sum += r.value * r.value;
    }
    return sum;
  };
  const start = [Math.log(median(use.map((i) => single[i].band.fwhmCm1)) / 1000), Math.log(median(use.map((i) => single[i].band.peakAbsorbance)))];
  const r = nelderMead(objective, start, { step: [0.15, 0.15], fTol: 1e-5, xTol: 1e-4, maxIterations: 120 });
  const { w, pk } = shapeOf(r.x);
  objective(r.x); // leave `positions` at the optimum's values

  const bands = labs.map((lab, i) => {
    const fromCoarse = fitApparentBand(lab, { illuminant, fwhmCm1: w, peakAbsorbance: pk, maxDeltaE00 });
    const local = bestPosition(lab, i, w, pk);
    const nu = local.value <= fromCoarse.deltaE00 ? local.x * 1000 : fromCoarse.band.wavenumberCm1;
    const band = { wavenumberCm1: nu, fwhmCm1: w, peakAbsorbance: pk };
    const modelLab = bandLab(band, illuminant);
    const dE = deltaE00(modelLab, lab);
    return { band, modelLab, deltaE00: dE, ...statusOf(lab, { band, deltaE00: dE }, maxDeltaE00) };
  });
  return { fwhmCm1: w, peakAbsorbance: pk, bands };
}
