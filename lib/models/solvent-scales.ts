/**
 * Linear solvation energy relationships for a dye's band position (or any property linear in energy).
 *
 * - Kamlet–Taft: ν̃ = ν̃0 + s·π* + a·α + b·β (+ d·δ) — M. J. Kamlet, J.-L. M. Abboud, M. H. Abraham &
 *   R. W. Taft 1983, "Linear solvation energy relationships. 23. A comprehensive collection of the
 *   solvatochromic parameters, π*, α, and β, and some methods for simplifying the generalized
 *   solvatochromic equation", J. Org. Chem. 48, 2877–2887. δ is the polarisability correction
 *   (0 for non-chlorinated aliphatic solvents, 0.5 polychlorinated aliphatic, 1 aromatic; same paper).
 * - One scale, ET(30): ν̃ = ν̃0 + m·ET(30) — C. Reichardt 1994, "Solvatochromic dyes as solvent polarity
 *   indicators", Chem. Rev. 94, 2319–2358.
 * - One scale, permittivity: ν̃ = ν̃0 + m·f(εr), f(εr) = (εr − 1)/(2εr + 1), the Kirkwood–Onsager reaction
 *   field function (L. Onsager 1936, "Electric moments of molecules in liquids", J. Am. Chem. Soc. 58,
 *   1486–1493; J. G. Kirkwood 1934, J. Chem. Phys. 2, 351).
 *
 * The fits are ordinary least squares (see ols.ts) and return one result object; `predictScaleModel` gives
 * a new solvent's value with its prediction interval and an extrapolation flag.
 */
import { ModelRefusal } from "./errors";
import { fitOls, predictOls, type Coefficient, type OlsPrediction, type OlsResult } from "./ols";

export const SCALE_MODELS = ["kamlet-taft", "et30", "permittivity"] as const;
export type ScaleModel = (typeof SCALE_MODELS)[number];

/** A solvent's parameters; null or absent when the table has no value. */
export type SolventParameters = {
  piStar?: number | null;
  alpha?: number | null;
  beta?: number | null;
  /** Kamlet–Taft polarisability correction δ (0, 0.5 or 1). */
  delta?: number | null;
  /** Reichardt ET(30), kcal/mol. */
  et30?: number | null;
  /** Relative permittivity εr. */
  permittivity?: number | null;
};

export type ScaleObservation = { solvent: string; parameters: SolventParameters; value: number };

export type ScaleFitOptions = {
  /** Name of the fitted property (e.g. "wavenumber") and its unit (e.g. "cm⁻¹"), carried into the result. */
  property?: string;
  unit?: string;
  /** Kamlet–Taft only: add the d·δ polarisability term. */
  withDelta?: boolean;
};

/** One fitted solvent model, statsmodels-style: everything a page or a prediction needs. */
export type ScaleFit = {
  model: ScaleModel;
  property: string;
  unit: string;
  /** Term names in design order, intercept excluded: "pi_star", "alpha", "beta", "delta", "et30", "f_epsilon". */
  terms: string[];
  coefficients: Record<string, Coefficient>;
  n: number;
  dof: number;
  residualStdErr: number;
  r2: number;
  looRmse: number;
  conditionNumber: number;
  vif: Record<string, number>;
  solvents: string[];
  observed: number[];
  fitted: number[];
  looPredicted: number[];
  leverage: number[];
  /** The design row (no intercept) of each solvent, for plotting against a scale. */
  design: number[][];
  xtxInverse: number[][];
};

/** f(εr) = (εr − 1)/(2εr + 1), Kirkwood–Onsager; 0 for εr = 1, → ½ for large εr. */
export function kirkwoodOnsager(permittivity: number): number {
  if (!(permittivity >= 1)) throw new RangeError("Relative permittivity must be at least 1");
  return (permittivity - 1) / (2 * permittivity + 1);
}

export const TERM_LABELS: Record<string, string> = {
  intercept: "intercept",
  pi_star: "π*",
  alpha: "α",
  beta: "β",
  delta: "δ",
  et30: "ET(30)",
  f_epsilon: "f(εr)",
};

const PARAMETER_WORDS: Record<string, string> = {
  pi_star: "Kamlet–Taft π*",
  alpha: "Kamlet–Taft α",
  beta: "Kamlet–Taft β",
  delta: "the polarisability correction δ",
  et30: "ET(30)",
  f_epsilon: "the relative permittivity εr",
};

export function termsOf(model: ScaleModel, withDelta = false): string[] {
  if (model === "kamlet-taft") return withDelta ? ["pi_star", "alpha", "beta", "delta"] : ["pi_star", "alpha", "beta"];
  if (model === "et30") return ["et30"];
  return ["f_epsilon"];
}

function termValue(term: string, p: SolventParameters): number | null {
  switch (term) {
    case "pi_star":
      return p.piStar ?? null;
    case "alpha":
      return p.alpha ?? null;
    case "beta":
      return p.beta ?? null;
    case "delta":
      return p.delta ?? null;
    case "et30":
      return p.et30 ?? null;
    case "f_epsilon":
      return p.permittivity == null ? null : kirkwoodOnsager(p.permittivity);
    default:
      throw new RangeError(`Unknown term ${term}`);
  }
}

/** The design row of one solvent for `terms`, or the list of parameters it lacks. */
export function designRow(terms: readonly string[], p: SolventParameters): { row: number[] } | { missing: string[] } {
  const values = terms.map((t) => termValue(t, p));
  const missing = terms.filter((_, i) => values[i] === null || !Number.isFinite(values[i] as number));
  return missing.length > 0 ? { missing } : { row: values as number[] };
}

/** Fits any of the three models; `fitKamletTaft`, `fitEt30` and `fitPermittivity` name them. */
export function fitScaleModel(model: ScaleModel, data: readonly ScaleObservation[], options: ScaleFitOptions = {}): ScaleFit {
  const terms = termsOf(model, model === "kamlet-taft" && options.withDelta === true);
  const rows: number[][] = [];
  const lacking: string[] = [];
  for (const obs of data) {
    const r = designRow(terms, obs.parameters);
    if ("missing" in r) lacking.push(`${obs.solvent} (${r.missing.map((m) => PARAMETER_WORDS[m]).join(", ")})`);
    else rows.push(r.row);
  }
  if (lacking.length > 0) {
    throw new ModelRefusal(
      "missing-parameters",
      `The solvent table has no ${model === "kamlet-taft" ? "Kamlet–Taft" : model === "et30" ? "ET(30)" : "permittivity"} value for ${lacking.join("; ")}; supply the parameters or leave ${lacking.length === 1 ? "that solvent" : "those solvents"} out.`,
    );
  }
  const ols: OlsResult = fitOls(terms, rows, data.map((d) => d.value), (t) => PARAMETER_WORDS[t] ?? t);
  return {
    model,
    property: options.property ?? "value",
    unit: options.unit ?? "",
    terms,
    coefficients: ols.coefficients,
    n: ols.n,
    dof: ols.dof,
    residualStdErr: ols.residualStdErr,
    r2: ols.r2,
    looRmse: ols.looRmse,
    conditionNumber: ols.conditionNumber,
    vif: ols.vif,
    solvents: data.map((d) => d.solvent),
    observed: data.map((d) => d.value),
    fitted: ols.fitted,
    looPredicted: ols.looPredicted,
    leverage: ols.leverage,
    design: rows,
    xtxInverse: ols.xtxInverse,
  };
}

/** Kamlet–Taft LSER (Kamlet, Abboud, Abraham & Taft 1983): value = v0 + s·π* + a·α + b·β (+ d·δ). */
export function fitKamletTaft(data: readonly ScaleObservation[], options: ScaleFitOptions = {}): ScaleFit {
  return fitScaleModel("kamlet-taft", data, options);
}

/** One-scale fit against Reichardt's ET(30) (Reichardt 1994). */
export function fitEt30(data: readonly ScaleObservation[], options: ScaleFitOptions = {}): ScaleFit {
  return fitScaleModel("et30", data, options);
}

/** One-scale fit against the Kirkwood–Onsager function f(εr) = (εr − 1)/(2εr + 1). */
export function fitPermittivity(data: readonly ScaleObservation[], options: ScaleFitOptions = {}): ScaleFit {
  return fitScaleModel("permittivity", data, options);
}

export type ScalePrediction = OlsPrediction;

/**
 * The fitted model's value in a new solvent, with the prediction interval t·s·√(1 + x₀ᵀ(XᵀX)⁻¹x₀)
 * (level 0.95 by default) and `extrapolated` when the solvent's leverage exceeds the training set's largest.
 * Refuses (ModelRefusal "missing-parameters") a solvent without the model's parameters.
 */
export function predictScaleModel(fit: ScaleFit, parameters: SolventParameters, level = 0.95): ScalePrediction {
  const r = designRow(fit.terms, parameters);
  if ("missing" in r) {
    throw new ModelRefusal("missing-parameters", `No prediction: the solvent lacks ${r.missing.map((m) => PARAMETER_WORDS[m]).join(", ")}.`);
  }
  return predictOls(
    { predictors: fit.terms, coefficients: fit.coefficients, residualStdErr: fit.residualStdErr, dof: fit.dof, xtxInverse: fit.xtxInverse, leverage: fit.leverage } as OlsResult,
    r.row,
    level,
  );
}
