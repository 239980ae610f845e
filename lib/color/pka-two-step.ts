/**
 * Two pKa's of a two-step indicator (H2In ⇌ HIn⁻ ⇌ In²⁻, e.g. thymol blue: red → yellow → blue) from
 * the colours of a pH series, by the same forward model as the one-step fit (lib/color/pka.ts) with a
 * third form: the vial absorbs A(λ) = f₀·A_H2In(λ) + f₁·A_HIn(λ) + f₂·A_In(λ) per wavelength, each form one
 * band of the shared band model, and its colour is the CIE colour of 10^−A(λ). The fractions of a
 * diprotic acid with [H⁺] = 10^−pH are f₀ : f₁ : f₂ = [H⁺]² : [H⁺]·Ka1 : Ka1·Ka2 (any analytical
 * chemistry text, e.g. D. C. Harris, "Quantitative Chemical Analysis", chapter on polyprotic acids).
 *
 * pKa1, pKa2 and the three bands are fitted together by minimising Σ ΔE00² over the vials (Nelder–Mead
 * from a grid start); standard errors by bootstrap over the vials. Which fit a series gets — one step or
 * two — is the chemist's choice (see `PhFitSteps`): the colours alone rarely decide it on a few vials.
 *
 * Refused, with a sentence, when the two pKa's are closer than MIN_PKA_GAP (the middle form then never
 * exceeds 61 % of the dye and its colour is never seen alone, so the two constants cannot be told apart
 * from colours), or when the series does not show three plateaus (a vial with at least PLATEAU_FRACTION
 * of each form, by the fitted pKa's).
 */
import type { AbsorptionBand } from "./band";
import { deltaE00 } from "./difference";
import { ColorInputError } from "./errors";
import { nelderMead } from "./nelder-mead";
import {
  FormMixture,
  TRANSITION_THRESHOLD_DELTA_E00,
  bandOf,
  bootstrapStdErrs,
  penalty,
  startForm,
  validatePhSeries,
  visibleChangeInterval,
  type PhPoint,
} from "./pka";
import type { Lab } from "./types";

/** One pKa (one colour change) or two (two changes), chosen by the chemist per series; 1 by default. */
export type PhFitSteps = 1 | 2;

/** pKa2 − pKa1 below this is refused (our rule, see the module comment: at 1 unit the middle form peaks at 61 %). */
export const MIN_PKA_GAP = 1;
/** A plateau is a vial holding at least this fraction of one form (our rule). */
export const PLATEAU_FRACTION = 0.8;
const BOOTSTRAP_RUNS = 20;

export type TwoStepPkaFit = {
  method: "colour-forward-model-two-step";
  /** Apparent pKa1 < pKa2 in the medium and ionic strength of the series. */
  pKas: [number, number];
  /** Bootstrap standard errors of pKa1 and pKa2. */
  pKaStdErrs: [number, number];
  bootstrapRuns: number;
  /** Visual transition interval of each step: where the colour differs from both of that step's end colours by the threshold. */
  transitions: [[number, number], [number, number]];
  transitionThresholdDeltaE00: number;
  /** Colours of H2In, HIn⁻ and In²⁻ (CIELAB D65). */
  labs: [Lab, Lab, Lab];
  bands: [AbsorptionBand, AbsorptionBand, AbsorptionBand];
  rmsDeltaE00: number;
  messages: string[];
};

/** Mole fractions [H2In, HIn⁻, In²⁻] at `pH` for pKa1, pKa2 (computed in logarithms, stable at any pH). */
export function diproticFractions(pH: number, pKa1: number, pKa2: number): [number, number, number] {
  const e = [0, pH - pKa1, 2 * pH - pKa1 - pKa2];
  const top = Math.max(...e);
  const w = e.map((v) => 10 ** (v - top));
  const sum = w[0] + w[1] + w[2];
  return [w[0] / sum, w[1] / sum, w[2] / sum];
}

/** The forward model of a two-step indicator: three forms mixed per wavelength (FormMixture). */
export class ThreeFormModel extends FormMixture {
  constructor(
    readonly bands: [AbsorptionBand, AbsorptionBand, AbsorptionBand],
    blankLab: Lab = [100, 0, 0],
  ) {
    super(bands, blankLab);
  }

  labAtPh(pH: number, pKa1: number, pKa2: number): Lab {
    return this.labOf(diproticFractions(pH, pKa1, pKa2));
  }
}

/** x = [pKa1, pKa2, H2In(3), HIn⁻(3), In²⁻(3)]. */
function modelOf(x: readonly number[], blank: Lab): ThreeFormModel {
  return new ThreeFormModel([bandOf(x.slice(2, 5)), bandOf(x.slice(5, 8)), bandOf(x.slice(8, 11))], blank);
}

function sseOf(x: readonly number[], points: readonly PhPoint[], blank: Lab): number {
  const model = modelOf(x, blank);
  let s = 0;
  for (const p of points) s += deltaE00(model.labAtPh(p.pH, x[0], x[1]), p.lab) ** 2;
  // pKa1 < pKa2 kept by a penalty, not a reparametrisation, so the simplex moves each pKa on its own.
  const order = Math.max(0, x[0] - x[1] + 0.1);
  return s + 100 * (penalty(x.slice(2, 5)) + penalty(x.slice(5, 8)) + penalty(x.slice(8, 11)) + order);
}

function startOf(points: readonly PhPoint[], blank: Lab): number[] {
  const sorted = [...points].sort((p, q) => p.pH - q.pH);
  const first = sorted[0].lab;
  const last = sorted[sorted.length - 1].lab;
  // The middle form: the vial that differs most from both ends.
  const middle = sorted.reduce((best, p) => (Math.min(deltaE00(p.lab, first), deltaE00(p.lab, last)) > Math.min(deltaE00(best.lab, first), deltaE00(best.lab, last)) ? p : best));
  const forms = [...startForm(first, blank), ...startForm(middle.lab, blank), ...startForm(last, blank)];
  const lo = sorted[0].pH;
  const hi = sorted[sorted.length - 1].pH;
  let best: number[] = [lo, hi, ...forms];
  let bestV = Infinity;
  for (let p1 = lo - 0.5; p1 <= hi + 1e-9; p1 += 0.25) {
    for (let p2 = p1 + MIN_PKA_GAP; p2 <= hi + 0.5 + 1e-9; p2 += 0.25) {
      const x = [p1, p2, ...forms];
      const v = sseOf(x, points, blank);
      if (v < bestV) {
        bestV = v;
        best = x;
      }
    }
  }
  return best;
}

const STEP = [0.2, 0.2, 0.5, 0.15, 0.3, 0.5, 0.15, 0.3, 0.5, 0.15, 0.3];

function fitOnce(points: readonly PhPoint[], blank: Lab, start: number[], maxIterations: number, restarts: number): { x: number[]; sse: number } {
  let r = nelderMead((x) => sseOf(x, points, blank), start, { step: STEP, maxIterations, fTol: 1e-7, xTol: 1e-5 });
  // Restarts from the optimum escape a collapsed simplex (Nelder–Mead practice).
  for (let k = 1; k <= restarts; k++) r = nelderMead((x) => sseOf(x, points, blank), r.x, { step: STEP.map((s) => s / (2 * k)), maxIterations, fTol: 1e-8, xTol: 1e-6 });
  return { x: r.x, sse: r.value };
}

/**
 * Fits pKa1 < pKa2 and the three forms' bands of a two-step indicator to the colours of a pH series;
 * refuses (ColorInputError, one sentence) what the module comment says.
 */
export function fitTwoPkaFromColours(points: readonly PhPoint[], blankLab: Lab = [100, 0, 0], opts: { bootstrapRuns?: number } = {}): TwoStepPkaFit {
  validatePhSeries(points, blankLab);
  if (points.length < 8) throw new ColorInputError(`A two-step fit needs at least 8 vials (three plateaus and two changes) and ${points.length} were given; measure more pH values or fit one step.`);
  const fit = fitOnce(points, blankLab, startOf(points, blankLab), 3000, 2);
  const [pKa1, pKa2] = fit.x;
  if (pKa2 - pKa1 < MIN_PKA_GAP) {
    throw new ColorInputError(`The two fitted pKa's (${pKa1.toFixed(2)} and ${pKa2.toFixed(2)}) are closer than ${MIN_PKA_GAP} pH unit, so the middle form's colour is never seen alone and they cannot be told apart from colours; fit one step.`);
  }
  const fractions = points.map((p) => diproticFractions(p.pH, pKa1, pKa2));
  const names = ["H2In (acid form)", "HIn⁻ (middle form)", "In²⁻ (base form)"];
  const missing = [0, 1, 2].filter((i) => !fractions.some((f) => f[i] >= PLATEAU_FRACTION));
  if (missing.length > 0) {
    throw new ColorInputError(
      `The series does not show three plateaus: no vial holds at least ${100 * PLATEAU_FRACTION} % of ${missing.map((i) => names[i]).join(" or ")} by the fitted pKa's ${pKa1.toFixed(2)} and ${pKa2.toFixed(2)}; add vials ${missing.map((i) => (i === 0 ? `below pH ${(pKa1 - 1).toFixed(1)}` : i === 1 ? `near pH ${((pKa1 + pKa2) / 2).toFixed(1)}` : `above pH ${(pKa2 + 1).toFixed(1)}`)).join(" and ")}, or fit one step.`,
    );
  }
  const model = modelOf(fit.x, blankLab);
  const labs: [Lab, Lab, Lab] = [model.labOf([1, 0, 0]), model.labOf([0, 1, 0]), model.labOf([0, 0, 1])];
  for (const [i, j] of [[0, 1], [1, 2]]) {
    if (deltaE00(labs[i], labs[j]) < TRANSITION_THRESHOLD_DELTA_E00) throw new ColorInputError(`The fitted ${names[i]} and ${names[j]} look alike (ΔE00 ${deltaE00(labs[i], labs[j]).toFixed(1)}); the series shows one colour change, so fit one step.`);
  }

  const boot = bootstrapStdErrs(points, opts.bootstrapRuns ?? BOOTSTRAP_RUNS, (sample) => fitOnce(sample, blankLab, fit.x, 400, 0).x.slice(0, 2));
  const residuals = points.map((p) => deltaE00(p.lab, model.labAtPh(p.pH, pKa1, pKa2)));
  const mid = (pKa1 + pKa2) / 2;
  const colourAt = (pH: number) => model.labAtPh(pH, pKa1, pKa2);
  const interval = (from: number, to: number, a: Lab, b: Lab, pKa: number): [number, number] => {
    const [low, high] = visibleChangeInterval(colourAt, from, to, a, b);
    return Number.isNaN(low) ? [pKa, pKa] : [low, high];
  };
  return {
    method: "colour-forward-model-two-step",
    pKas: [pKa1, pKa2],
    pKaStdErrs: [boot.stdErrs[0], boot.stdErrs[1] ?? Number.NaN],
    bootstrapRuns: boot.runs,
    transitions: [interval(pKa1 - 5, mid, labs[0], labs[1], pKa1), interval(mid, pKa2 + 5, labs[1], labs[2], pKa2)],
    transitionThresholdDeltaE00: TRANSITION_THRESHOLD_DELTA_E00,
    labs,
    bands: model.bands,
    rmsDeltaE00: Math.sqrt(residuals.reduce((s, d) => s + d * d, 0) / residuals.length),
    messages: [],
  };
}

/** Protons released per dye molecule at `pH`: n̄ = f(HIn⁻) + 2·f(In²⁻), 0 to 2 (the two-step titration curve). */
export function protonsReleased(pH: number, pKa1: number, pKa2: number): number {
  const [, f1, f2] = diproticFractions(pH, pKa1, pKa2);
  return f1 + 2 * f2;
}

/**
 * Where a vial's colour lies on the fitted model's path, as protons released (n̄ at the pH, scanned
 * every 0.02 over pKa1 − 4 to pKa2 + 4, whose model colour is closest in ΔE00), for plotting measured
 * vials against the fitted curve.
 */
export function apparentProtonsReleased(model: ThreeFormModel, lab: Lab, pKa1: number, pKa2: number): number {
  let best = pKa1 - 4;
  let bestD = Infinity;
  for (let pH = pKa1 - 4; pH <= pKa2 + 4; pH += 0.02) {
    const d = deltaE00(model.labAtPh(pH, pKa1, pKa2), lab);
    if (d < bestD) {
      bestD = d;
      best = pH;
    }
  }
  return protonsReleased(best, pKa1, pKa2);
}
