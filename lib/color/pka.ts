/**
 * pKa of an acid–base indicator from a pH series, done where the physics is linear.
 *
 * Beer–Lambert holds per wavelength: a vial holding the acid form HIn and the base form In⁻ of one dye
 * absorbs A(λ) = (1 − f)·A_acid(λ) + f·A_base(λ), with f = [In⁻]/([HIn] + [In⁻]) = 1 / (1 + 10^(pKa − pH))
 * (Henderson–Hasselbalch; H. N. Po & N. M. Senozan, "The Henderson–Hasselbalch equation: its history and
 * limitations", J. Chem. Educ. 78 (2001) 1499). It does NOT hold per broad camera channel, so:
 *
 *  - from photographed colours (`fitPkaFromColours`): each form's spectrum is an absorption band of the
 *    shared band model (lib/color/band.ts), the vial's colour is the CIE colour of 10^−A(λ), and pKa and
 *    both bands are fitted together by minimising Σ ΔE00² over the vials;
 *  - from measured spectra (`fitPkaFromSpectra`, pka-spectra.ts): a global least-squares fit in
 *    absorbance across all wavelengths, with an SVD rank check and isosbestic points.
 *
 * Every pKa here is APPARENT: it belongs to the medium and ionic strength it was measured in (pH in a
 * non-aqueous or mixed medium is not aqueous pH). `daviesCorrection` optionally estimates the
 * thermodynamic value at zero ionic strength for an aqueous medium.
 */
import { bandAbsorbanceAt, type AbsorptionBand } from "./band";
import { parseNumericCsv } from "./csv";
import { deltaE00 } from "./difference";
import { ColorInputError } from "./errors";
import { WHITE_POINTS_2DEG } from "./illuminants";
import { labToXyz, xyzToLab } from "./lab";
import { nelderMead } from "./nelder-mead";
import { tristimulusWeights } from "./spectrum";
import { mulberry32 } from "../random";
import type { Lab, Xyz } from "./types";

/** One vial of a pH series: its pH and its colour, CIELAB D65. */
export type PhPoint = { pH: number; lab: Lab };

export type PkaFlag = "acid-plateau-missing" | "base-plateau-missing" | "one-form-dominates" | "one-colour-indicator" | "few-vials-in-transition";

export type PkaFit = {
  method: "colour-forward-model";
  /** Apparent pKa in the medium and ionic strength of the series. */
  pKa: number;
  /** Standard error of pKa: standard deviation of refits over vials resampled with replacement (bootstrap). */
  pKaStdErr: number;
  bootstrapRuns: number;
  /**
   * Visual transition interval: the pH range where the colour differs from both end colours by at least
   * `transitionThresholdDeltaE00`.
   */
  transition: [number, number];
  transitionThresholdDeltaE00: number;
  acidLab: Lab;
  baseLab: Lab;
  acidBand: AbsorptionBand;
  baseBand: AbsorptionBand;
  /** ΔE00 between the two forms' colours. */
  contrastDeltaE00: number;
  /** Root mean square ΔE00 between each vial and the model colour at its pH. */
  rmsDeltaE00: number;
  flags: PkaFlag[];
  /** One sentence per flag, for the person. */
  messages: string[];
};

/**
 * ΔE00 that counts as "visibly different" for the transition interval: 3 (common practice, no source:
 * about 1 is just noticeable side by side under good conditions, 2–3 is seen readily by an untrained
 * observer).
 */
export const TRANSITION_THRESHOLD_DELTA_E00 = 3;
/** Below this ΔE00 between the two forms the series shows no colour change to fit (our limit). */
const MIN_FORM_DIFFERENCE = 3;
/** A form whose band peaks below this absorbance is colourless in practice (our limit). */
const COLOURLESS_PEAK = 0.03;
/** Bootstrap refits for the standard error (speed/precision trade-off; our choice). */
const BOOTSTRAP_RUNS = 25;

/** Base fraction at `pH` for `pKa`: Henderson–Hasselbalch, [A⁻]/([HA] + [A⁻]) = 1 / (1 + 10^(pKa − pH)). */
export function baseFraction(pH: number, pKa: number): number {
  return 1 / (1 + 10 ** (pKa - pH));
}

/** Parameters of one form: ν̃max in 1000 cm⁻¹, ln(FWHM in 1000 cm⁻¹), ln(peak absorbance). */
type FormParams = [number, number, number];
const NU_RANGE: [number, number] = [11, 30];
const LN_W_RANGE: [number, number] = [Math.log(1.2), Math.log(10)];
const LN_P_RANGE: [number, number] = [Math.log(1e-4), Math.log(5)];
const clamp = (v: number, [lo, hi]: [number, number]) => Math.min(hi, Math.max(lo, v));
const outside = (v: number, [lo, hi]: [number, number]) => (v < lo ? lo - v : v > hi ? v - hi : 0);

/** Band of one form from its fit parameters (clamped to the ranges above). */
export function bandOf(p: readonly number[]): AbsorptionBand {
  return { wavenumberCm1: 1000 * clamp(p[0], NU_RANGE), fwhmCm1: 1000 * Math.exp(clamp(p[1], LN_W_RANGE)), peakAbsorbance: Math.exp(clamp(p[2], LN_P_RANGE)) };
}

/** How far one form's fit parameters lie outside their ranges (0 inside). */
export function penalty(p: readonly number[]): number {
  return outside(p[0], NU_RANGE) + 10 * outside(p[1], LN_W_RANGE) + 10 * outside(p[2], LN_P_RANGE);
}

/**
 * Tristimulus weights of D65 and the CIE 1931 2° observer on a 5 nm grid (360–830 nm): the 1 nm weights
 * of CIE 015:2018 summed over each 5 nm bin, i.e. the transmittance taken as constant within ±2 nm. For
 * absorption bands at least 1,200 cm⁻¹ wide this changes a colour by well under 0.05 ΔE00 and makes the
 * fit five times faster.
 */
type Grid5 = { nm: Float64Array; wx: Float64Array; wy: Float64Array; wz: Float64Array };
let grid5: Grid5 | null = null;
function weights5(): Grid5 {
  if (grid5) return grid5;
  const w = tristimulusWeights("D65");
  const n = Math.floor((830 - 360) / 5) + 1;
  const g: Grid5 = { nm: new Float64Array(n), wx: new Float64Array(n), wy: new Float64Array(n), wz: new Float64Array(n) };
  for (let k = 0; k < n; k++) g.nm[k] = 360 + 5 * k;
  w.wavelengths.forEach((nm, i) => {
    const k = Math.min(n - 1, Math.max(0, Math.round((nm - 360) / 5)));
    g.wx[k] += w.wx[i];
    g.wy[k] += w.wy[i];
    g.wz[k] += w.wz[i];
  });
  grid5 = g;
  return g;
}

/**
 * Colour of a mixture of forms, each an absorption band of the shared band model (lib/color/band.ts):
 * CIELAB (D65) of 10^−Σ wᵢ·Aᵢ(λ), mixed per wavelength, seen through the blank vial. The blank (the vial
 * with solvent only, measured as a colour) is applied as a component-wise XYZ factor blank/white (an
 * approximation: the blank's spectrum is not known).
 */
export class FormMixture {
  /** Per form, −ln 10 · A(λ) on the 5 nm grid, so that T = exp(Σ wᵢ·valueᵢ). */
  private readonly forms: Float64Array[];
  private readonly g = weights5();
  private readonly white: Xyz = WHITE_POINTS_2DEG.D65;
  private readonly blankFactor: Xyz;

  constructor(bands: readonly AbsorptionBand[], blankLab: Lab = [100, 0, 0]) {
    this.forms = bands.map((band) => Float64Array.from(this.g.nm, (nm) => -Math.LN10 * bandAbsorbanceAt(band, nm)));
    this.blankFactor = blankLab[0] === 100 && blankLab[1] === 0 && blankLab[2] === 0 ? [1, 1, 1] : blankFactorOf(blankLab, this.white);
  }

  /** Colour with form i at mole fraction `weights[i]`. */
  labOf(weights: readonly number[]): Lab {
    const { wx, wy, wz } = this.g;
    let x = 0;
    let y = 0;
    let z = 0;
    for (let i = 0; i < wx.length; i++) {
      let e = 0;
      for (let j = 0; j < this.forms.length; j++) e += weights[j] * this.forms[j][i];
      const t = Math.exp(e);
      x += t * wx[i];
      y += t * wy[i];
      z += t * wz[i];
    }
    return xyzToLab([x * this.blankFactor[0], y * this.blankFactor[1], z * this.blankFactor[2]], this.white);
  }
}

/** The forward model of a one-step indicator: the acid form HIn and the base form In⁻ (FormMixture). */
export class TwoFormModel extends FormMixture {
  constructor(
    readonly acidBand: AbsorptionBand,
    readonly baseBand: AbsorptionBand,
    blankLab: Lab = [100, 0, 0],
  ) {
    super([acidBand, baseBand], blankLab);
  }

  /** Colour at base fraction f. */
  labAt(f: number): Lab {
    return this.labOf([1 - f, f]);
  }
}

function blankFactorOf(blankLab: Lab, white: Xyz): Xyz {
  const blank = labToXyz(blankLab, white);
  return [blank[0] / white[0], blank[1] / white[1], blank[2] / white[2]];
}

type Fitted = { pKa: number; acid: number[]; base: number[]; sse: number };

/** Σ ΔE00² of the vials against the model with parameters x = [pKa, acid(3), base(3)]. */
function sseOf(x: readonly number[], points: readonly PhPoint[], blank: Lab): number {
  const model = new TwoFormModel(bandOf(x.slice(1, 4)), bandOf(x.slice(4, 7)), blank);
  let s = 0;
  for (const p of points) s += deltaE00(model.labAt(baseFraction(p.pH, x[0])), p.lab) ** 2;
  return s + 100 * (penalty(x.slice(1, 4)) + penalty(x.slice(4, 7)));
}

/** A single band whose colour is close to `lab` (start values only), colourless allowed. */
export function startForm(lab: Lab, blank: Lab): number[] {
  if (deltaE00(lab, blank) < 1.5) return [20, Math.log(4), Math.log(0.001)];
  let best: { x: number[]; v: number } = { x: [20, Math.log(4), Math.log(0.5)], v: Infinity };
  for (let nu = 13; nu <= 27; nu += 1) {
    for (const w of [2.5, 4.5]) {
      for (const pk of [0.1, 0.4, 1, 2]) {
        const x = [nu, Math.log(w), Math.log(pk)];
        const v = deltaE00(new TwoFormModel(bandOf(x), bandOf(x), blank).labAt(0), lab);
        if (v < best.v) best = { x, v };
      }
    }
  }
  const r = nelderMead((x) => deltaE00(new TwoFormModel(bandOf(x), bandOf(x), blank).labAt(0), lab) + penalty(x), best.x, { step: [0.5, 0.2, 0.3], maxIterations: 300, fTol: 1e-6 });
  return r.x;
}

function fitOnce(points: readonly PhPoint[], blank: Lab, start: number[] | null, maxIterations: number, restart = true): Fitted {
  let x0 = start;
  if (!x0) {
    const sorted = [...points].sort((p, q) => p.pH - q.pH);
    const acid = startForm(sorted[0].lab, blank);
    const base = startForm(sorted[sorted.length - 1].lab, blank);
    const lo = sorted[0].pH;
    const hi = sorted[sorted.length - 1].pH;
    let bestPka = (lo + hi) / 2;
    let bestV = Infinity;
    for (let p = lo - 1; p <= hi + 1 + 1e-9; p += 0.1) {
      const v = sseOf([p, ...acid, ...base], points, blank);
      if (v < bestV) {
        bestV = v;
        bestPka = p;
      }
    }
    x0 = [bestPka, ...acid, ...base];
  }
  const step = [0.3, 0.5, 0.15, 0.3, 0.5, 0.15, 0.3];
  let r = nelderMead((x) => sseOf(x, points, blank), x0, { step, maxIterations, fTol: 1e-7, xTol: 1e-5 });
  // A restart from the optimum escapes a collapsed simplex (Nelder–Mead practice).
  if (restart) r = nelderMead((x) => sseOf(x, points, blank), r.x, { step: step.map((s) => s / 3), maxIterations, fTol: 1e-8, xTol: 1e-6 });
  return { pKa: r.x[0], acid: r.x.slice(1, 4), base: r.x.slice(4, 7), sse: r.value };
}

/** Refuses a series no pKa can be read from (too few vials or pH values, not numbers, a bad blank). */
export function validatePhSeries(points: readonly PhPoint[], blankLab: Lab) {
  if (points.length < 5) throw new ColorInputError(`A pKa fit needs at least 5 vials across the pH range and ${points.length} were given; measure more pH values.`);
  if (!points.every((p) => Number.isFinite(p.pH) && p.lab.every(Number.isFinite))) {
    throw new ColorInputError("A vial of the pH series has a value that is not a number; check the data.");
  }
  if (points.some((p) => p.pH < -2 || p.pH > 16)) throw new ColorInputError("A pH in the series lies outside −2 to 16; check the pH column.");
  if (new Set(points.map((p) => p.pH)).size < 4) throw new ColorInputError("The pH series has fewer than 4 different pH values; spread the vials over the transition.");
  if (!(blankLab[0] > 0) || !blankLab.every(Number.isFinite)) throw new ColorInputError("The blank must have a lightness above 0; give the colour of the vial with solvent only.");
}

/**
 * Fits pKa and the two forms' absorption bands to the colours of a pH series by the forward model
 * {@link TwoFormModel}, minimising Σ ΔE00² (CIEDE2000, CIE 142-2001) over the vials with Nelder–Mead
 * from a grid start. The standard error is the standard deviation of `BOOTSTRAP_RUNS` refits on vials
 * resampled with replacement (B. Efron & R. Tibshirani, "An Introduction to the Bootstrap", 1993),
 * seeded so a series always gives the same figure.
 *
 * Refuses fewer than 5 vials, fewer than 4 distinct pH values, no colour change and a fitted pKa
 * outside the measured pH range; flags a missing plateau, a series in which one form dominates, few
 * vials inside the transition, and a colourless form (one-colour indicator).
 */
export function fitPkaFromColours(points: readonly PhPoint[], blankLab: Lab = [100, 0, 0], opts: { bootstrapRuns?: number } = {}): PkaFit {
  validatePhSeries(points, blankLab);
  const fit = fitOnce(points, blankLab, null, 1500);
  const acidBand = bandOf(fit.acid);
  const baseBand = bandOf(fit.base);
  const model = new TwoFormModel(acidBand, baseBand, blankLab);
  const acidLab = model.labAt(0);
  const baseLab = model.labAt(1);
  const contrast = deltaE00(acidLab, baseLab);
  const pHs = points.map((p) => p.pH);
  const lo = Math.min(...pHs);
  const hi = Math.max(...pHs);
  if (!(contrast >= MIN_FORM_DIFFERENCE)) {
    throw new ColorInputError(`The colour barely changes across the pH series (ΔE00 ${contrast.toFixed(1)} between the fitted forms); a pKa cannot be read from it.`);
  }
  if (fit.pKa < lo || fit.pKa > hi) {
    throw new ColorInputError(`The fitted pKa ${fit.pKa.toFixed(2)} lies outside the measured pH range ${lo}–${hi}; add vials on that side of the transition.`);
  }

  const start = [fit.pKa, ...fit.acid, ...fit.base];
  const boot = bootstrapStdErrs(points, opts.bootstrapRuns ?? BOOTSTRAP_RUNS, (sample) => [fitOnce(sample, blankLab, start, 250, false).pKa]);
  const pKaStdErr = boot.stdErrs[0];

  const residuals = points.map((p) => deltaE00(p.lab, model.labAt(baseFraction(p.pH, fit.pKa))));
  const rmsDeltaE00 = Math.sqrt(residuals.reduce((s, d) => s + d * d, 0) / residuals.length);

  const flags: PkaFlag[] = [];
  const messages: string[] = [];
  const fLo = baseFraction(lo, fit.pKa);
  const fHi = baseFraction(hi, fit.pKa);
  if (fLo > 0.1) {
    flags.push("acid-plateau-missing");
    messages.push(`No vial shows the acid form alone (at pH ${lo} ${Math.round(100 * fLo)} % is already in the base form); add vials below pH ${(fit.pKa - 1.5).toFixed(1)}.`);
  }
  if (fHi < 0.9) {
    flags.push("base-plateau-missing");
    messages.push(`No vial shows the base form alone (at pH ${hi} only ${Math.round(100 * fHi)} % is in the base form); add vials above pH ${(fit.pKa + 1.5).toFixed(1)}.`);
  }
  const fractions = pHs.map((pH) => baseFraction(pH, fit.pKa));
  const inTransition = fractions.filter((f) => f > 0.1 && f < 0.9).length;
  const mostlyAcid = fractions.filter((f) => f < 0.5).length / fractions.length;
  if (mostlyAcid > 0.75 || mostlyAcid < 0.25) {
    flags.push("one-form-dominates");
    messages.push(`${Math.round(100 * Math.max(mostlyAcid, 1 - mostlyAcid))} % of the vials are mostly in the ${mostlyAcid > 0.5 ? "acid" : "base"} form; spread the pH values more evenly around the pKa.`);
  }
  if (inTransition < 2) {
    flags.push("few-vials-in-transition");
    messages.push(`Only ${inTransition} ${inTransition === 1 ? "vial lies" : "vials lie"} inside the colour change (10–90 % base form); add vials between pH ${(fit.pKa - 1).toFixed(1)} and ${(fit.pKa + 1).toFixed(1)}.`);
  }
  if (acidBand.peakAbsorbance < COLOURLESS_PEAK || baseBand.peakAbsorbance < COLOURLESS_PEAK) {
    flags.push("one-colour-indicator");
    messages.push(`The ${acidBand.peakAbsorbance < COLOURLESS_PEAK ? "acid" : "base"} form is practically colourless: a one-colour indicator, whose visible change depends on its concentration.`);
  }

  return {
    method: "colour-forward-model",
    pKa: fit.pKa,
    pKaStdErr,
    bootstrapRuns: boot.runs,
    transition: visualTransition(model, fit.pKa, acidLab, baseLab),
    transitionThresholdDeltaE00: TRANSITION_THRESHOLD_DELTA_E00,
    acidLab,
    baseLab,
    acidBand,
    baseBand,
    contrastDeltaE00: contrast,
    rmsDeltaE00,
    flags,
    messages,
  };
}

/**
 * Standard errors by bootstrap (B. Efron & R. Tibshirani, "An Introduction to the Bootstrap", 1993):
 * the standard deviation of each refitted value over `runs` resamples of the vials with replacement,
 * seeded by the series length so a series always gives the same figures. Resamples with fewer than 4
 * distinct pH values are skipped.
 */
export function bootstrapStdErrs(points: readonly PhPoint[], runs: number, refit: (sample: PhPoint[]) => number[]): { stdErrs: number[]; runs: number } {
  const random = mulberry32(0x9ca + points.length);
  const boot: number[][] = [];
  for (let b = 0; b < runs; b++) {
    const sample = points.map(() => points[Math.floor(random() * points.length)]);
    if (new Set(sample.map((p) => p.pH)).size < 4) continue;
    boot.push(refit(sample));
  }
  if (boot.length < 2) return { stdErrs: [Number.NaN], runs: boot.length };
  const stdErrs = boot[0].map((_, i) => {
    const mean = boot.reduce((s, v) => s + v[i], 0) / boot.length;
    return Math.sqrt(boot.reduce((s, v) => s + (v[i] - mean) ** 2, 0) / (boot.length - 1));
  });
  return { stdErrs, runs: boot.length };
}

/**
 * The pH range within [from, to] where `colourAt` differs from both end colours by at least the
 * threshold, scanned every 0.01 pH; [NaN, NaN] when no pH there qualifies.
 */
export function visibleChangeInterval(colourAt: (pH: number) => Lab, from: number, to: number, endA: Lab, endB: Lab, threshold = TRANSITION_THRESHOLD_DELTA_E00): [number, number] {
  let low = Number.NaN;
  let high = Number.NaN;
  for (let k = 0; from + k / 100 <= to + 1e-9; k++) {
    const pH = from + k / 100;
    const lab = colourAt(pH);
    if (deltaE00(lab, endA) >= threshold && deltaE00(lab, endB) >= threshold) {
      if (Number.isNaN(low)) low = pH;
      high = pH;
    }
  }
  return [low, high];
}

/**
 * The pH range where the model colour differs from both end colours by at least the threshold, scanned
 * every 0.01 pH over pKa ± 5. Not pKa ± 1: a one-colour indicator's interval is lopsided, and an intense
 * two-colour one is wider than a faint one.
 */
export function visualTransition(model: TwoFormModel, pKa: number, acidLab: Lab, baseLab: Lab, threshold = TRANSITION_THRESHOLD_DELTA_E00): [number, number] {
  const [low, high] = visibleChangeInterval((pH) => model.labAt(baseFraction(pH, pKa)), pKa - 5, pKa + 5, acidLab, baseLab, threshold);
  return Number.isNaN(low) ? [pKa, pKa] : [low, high];
}

/**
 * Davies equation: log10 γ = −A z² (√I / (1 + √I) − 0.3 I), A = 0.509 (water, 25 °C); C. W. Davies,
 * "Ion Association", Butterworths, London 1962. Valid for aqueous solutions up to I ≈ 0.1–0.5 mol/L.
 */
export function daviesLog10Gamma(charge: number, ionicStrengthMolL: number, a = 0.509): number {
  const s = Math.sqrt(ionicStrengthMolL);
  return -a * charge * charge * (s / (1 + s) - 0.3 * ionicStrengthMolL);
}

/**
 * Thermodynamic pKa (I → 0) from an apparent pKa' measured with a pH electrode (pH = −log a_H+) and
 * concentration ratios: pKa = pKa' − log10(γ_base / γ_acid), γ by Davies. `acidCharge` is the charge of
 * the acid form (0 for HIn ⇌ H⁺ + In⁻, −1 for HIn⁻ ⇌ H⁺ + In²⁻ as in sulfonephthaleins' second step).
 * Aqueous media only.
 */
export function daviesCorrectedPka(apparentPka: number, ionicStrengthMolL: number, acidCharge = 0): number {
  if (!(ionicStrengthMolL >= 0)) throw new ColorInputError("The ionic strength must be a number of mol/L, 0 or more.");
  return apparentPka - (daviesLog10Gamma(acidCharge - 1, ionicStrengthMolL) - daviesLog10Gamma(acidCharge, ionicStrengthMolL));
}

/** Reads a pH series CSV with the header columns pH, L, a, b (CIELAB D65). */
export function parsePhSeriesCsv(text: string): PhPoint[] {
  return parseNumericCsv(text, ["pH", "L", "a", "b"], "pH series").map(([pH, L, a, b]) => ({ pH, lab: [L, a, b] }));
}

/**
 * The base fraction a vial's colour corresponds to on the fitted model's path (the f in 0–1 whose model
 * colour is closest in ΔE00), for plotting measured vials against the fitted curve f(pH).
 */
export function apparentBaseFraction(model: TwoFormModel, lab: Lab): number {
  let best = 0;
  let bestD = Infinity;
  for (let k = 0; k <= 100; k++) {
    const d = deltaE00(model.labAt(k / 100), lab);
    if (d < bestD) {
      bestD = d;
      best = k / 100;
    }
  }
  let lo = Math.max(0, best - 0.01);
  let hi = Math.min(1, best + 0.01);
  for (let i = 0; i < 30; i++) {
    const m1 = lo + (hi - lo) / 3;
    const m2 = hi - (hi - lo) / 3;
    if (deltaE00(model.labAt(m1), lab) < deltaE00(model.labAt(m2), lab)) hi = m2;
    else lo = m1;
  }
  return (lo + hi) / 2;
}
