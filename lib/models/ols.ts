/**
 * Ordinary least squares with the diagnostics a solvent model needs, on ml-matrix (QR for the solution,
 * SVD for the condition number and (XᵀX)⁻¹).
 *
 * Formulas are the textbook ones (Draper & Smith 1998, Applied Regression Analysis, 3rd ed., ch. 5 and 8;
 * Belsley, Kuh & Welsch 1980, Regression Diagnostics): coefficient covariance s²(XᵀX)⁻¹ with
 * s² = RSS/(n − p); leverage hᵢᵢ = xᵢᵀ(XᵀX)⁻¹xᵢ; the leave-one-out residual eᵢ/(1 − hᵢᵢ) (PRESS, Allen 1974,
 * "The relationship between variable selection and data augmentation and a method for prediction",
 * Technometrics 16, 125–127); variance inflation factor VIFⱼ = 1/(1 − R²ⱼ) from regressing predictor j on
 * the others (Marquardt 1970, Technometrics 12, 591–612).
 */
import { Matrix, QrDecomposition, SingularValueDecomposition } from "ml-matrix";
import { ModelRefusal } from "./errors";
import { studentTQuantile } from "./student-t";

export type Coefficient = { value: number; stdErr: number };

export type OlsResult = {
  /** Predictor names in design order, excluding the intercept. */
  predictors: string[];
  coefficients: Record<string, Coefficient>;
  n: number;
  /** Residual degrees of freedom, n − p. */
  dof: number;
  /** Residual standard error s = √(RSS/(n − p)). */
  residualStdErr: number;
  r2: number;
  fitted: number[];
  residuals: number[];
  leverage: number[];
  /** Leave-one-out prediction of each observation from a fit without it. */
  looPredicted: number[];
  /** Root mean square of the leave-one-out prediction errors, in the property's unit. */
  looRmse: number;
  /** 2-norm condition number of the design with each column scaled to unit length (Belsley, Kuh & Welsch 1980). */
  conditionNumber: number;
  /** Variance inflation factor per predictor (intercept excluded). */
  vif: Record<string, number>;
  /** (XᵀX)⁻¹ in design order (intercept first), for prediction intervals. */
  xtxInverse: number[][];
};

/**
 * Above this VIF a predictor is taken as collinear with the others and the fit is refused. 10 is the usual
 * rule of thumb (Marquardt 1970; Kutner, Nachtsheim & Neter 2004, Applied Linear Regression Models, §10.5).
 */
export const MAX_VIF = 10;

function rSquared(y: readonly number[], fitted: readonly number[]): number {
  const mean = y.reduce((s, v) => s + v, 0) / y.length;
  let ssTot = 0;
  let ssRes = 0;
  y.forEach((v, i) => {
    ssTot += (v - mean) ** 2;
    ssRes += (v - fitted[i]) ** 2;
  });
  return ssTot === 0 ? (ssRes === 0 ? 1 : 0) : 1 - ssRes / ssTot;
}

function varianceInflation(rows: readonly number[][], j: number): number {
  const target = rows.map((r) => r[j]);
  const others = rows.map((r) => [1, ...r.filter((_, k) => k !== j)]);
  const mean = target.reduce((s, v) => s + v, 0) / target.length;
  if (target.every((v) => Math.abs(v - mean) < 1e-12)) return Infinity;
  const x = new Matrix(others);
  const svd = new SingularValueDecomposition(x, { autoTranspose: true });
  const beta = svd.solve(Matrix.columnVector(target)).to1DArray();
  const fitted = others.map((r) => r.reduce((s, v, k) => s + v * beta[k], 0));
  const r2 = rSquared(target, fitted);
  return r2 >= 1 ? Infinity : 1 / (1 - r2);
}

/**
 * Fits y = b0 + Σ bⱼ·xⱼ. `rows` holds one row of predictor values per observation (no intercept column).
 * Refuses (ModelRefusal) fewer than p + 2 observations and predictors whose VIF exceeds MAX_VIF.
 * `describe` turns a predictor name into words for the refusal messages.
 */
export function fitOls(
  predictors: readonly string[],
  rows: readonly number[][],
  y: readonly number[],
  describe: (name: string) => string = (name) => name,
): OlsResult {
  const n = y.length;
  const p = predictors.length + 1;
  if (rows.length !== n) throw new RangeError("One row of predictors is needed per observation");
  if (y.some((v) => !Number.isFinite(v)) || rows.some((r) => r.length !== predictors.length || r.some((v) => !Number.isFinite(v)))) {
    throw new ModelRefusal("invalid-input", "Every value and every solvent parameter must be a finite number.");
  }
  if (n < p + 2) {
    throw new ModelRefusal(
      "too-few-solvents",
      `This model has ${p} terms and needs at least ${p + 2} solvents; only ${n} ${n === 1 ? "was" : "were"} given. Measure the dye in more solvents.`,
    );
  }
  const vif: Record<string, number> = {};
  predictors.forEach((name, j) => {
    vif[name] = predictors.length === 1 ? (rows.every((r) => Math.abs(r[0] - rows[0][0]) < 1e-12) ? Infinity : 1) : varianceInflation(rows, j);
  });
  const worst = predictors.filter((name) => !(vif[name] <= MAX_VIF));
  if (worst.length > 0) {
    const constant = worst.filter((name) => vif[name] === Infinity && rows.every((r) => r[predictors.indexOf(name)] === rows[0][predictors.indexOf(name)]));
    const what = constant.length > 0
      ? `${constant.map(describe).join(" and ")} ${constant.length === 1 ? "is" : "are"} the same in every solvent of this set`
      : `${worst.map(describe).join(", ")} ${worst.length === 1 ? "moves" : "move"} together across this set of solvents (variance inflation above ${MAX_VIF})`;
    throw new ModelRefusal(
      "collinear-parameters",
      `The fit cannot tell the solvent parameters apart: ${what}. Add solvents that vary them independently (for example protic and aprotic solvents of similar polarity).`,
    );
  }

  const design = new Matrix(rows.map((r) => [1, ...r]));
  // Condition number of the column-equilibrated design, so units of the scales do not inflate it.
  const norms = Array.from({ length: p }, (_, j) => Math.hypot(...design.getColumn(j)));
  const scaled = design.clone();
  for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) scaled.set(i, j, design.get(i, j) / norms[j]);
  const conditionNumber = new SingularValueDecomposition(scaled, { autoTranspose: true }).condition;

  const qr = new QrDecomposition(design);
  if (!qr.isFullRank()) {
    throw new ModelRefusal("collinear-parameters", "The solvent parameters of this set are linearly dependent; add solvents that vary them independently.");
  }
  const beta = qr.solve(Matrix.columnVector([...y])).to1DArray();
  const xtxInverse = new SingularValueDecomposition(design.transpose().mmul(design)).inverse().to2DArray();
  const fitted = rows.map((r) => beta[0] + r.reduce((s, v, j) => s + v * beta[j + 1], 0));
  const residuals = y.map((v, i) => v - fitted[i]);
  const rss = residuals.reduce((s, e) => s + e * e, 0);
  const dof = n - p;
  const s2 = rss / dof;
  const leverage = rows.map((r) => quadraticForm(xtxInverse, [1, ...r]));
  if (leverage.some((h) => h > 1 - 1e-9)) {
    throw new ModelRefusal(
      "collinear-parameters",
      "The fit cannot tell the solvent parameters apart: one solvent alone decides a coefficient (no other solvent of the set varies that parameter). Add solvents that vary it.",
    );
  }
  const looPredicted = y.map((v, i) => v - residuals[i] / (1 - leverage[i]));
  const looRmse = Math.sqrt(y.reduce((s, v, i) => s + (v - looPredicted[i]) ** 2, 0) / n);

  const coefficients: Record<string, Coefficient> = {};
  ["intercept", ...predictors].forEach((name, j) => {
    coefficients[name] = { value: beta[j], stdErr: Math.sqrt(s2 * xtxInverse[j][j]) };
  });
  return {
    predictors: [...predictors],
    coefficients,
    n,
    dof,
    residualStdErr: Math.sqrt(s2),
    r2: rSquared(y, fitted),
    fitted,
    residuals,
    leverage,
    looPredicted,
    looRmse,
    conditionNumber,
    vif,
    xtxInverse,
  };
}

export function quadraticForm(m: readonly number[][], x: readonly number[]): number {
  let total = 0;
  for (let i = 0; i < x.length; i++) for (let j = 0; j < x.length; j++) total += x[i] * m[i][j] * x[j];
  return total;
}

export type OlsPrediction = {
  value: number;
  /** Half-width of the two-sided prediction interval: t·s·√(1 + x₀ᵀ(XᵀX)⁻¹x₀). */
  halfWidth: number;
  /** Standard error of a new observation, s·√(1 + h₀). */
  stdErr: number;
  lower: number;
  upper: number;
  /** h₀ = x₀ᵀ(XᵀX)⁻¹x₀. */
  leverage: number;
  /** True when h₀ exceeds the largest leverage in the training set: the point lies outside the fitted region. */
  extrapolated: boolean;
  level: number;
};

/** Prediction of a new observation with its interval (Draper & Smith 1998, §3.1), level 0.95 by default. */
export function predictOls(fit: OlsResult, x: readonly number[], level = 0.95): OlsPrediction {
  if (x.length !== fit.predictors.length) throw new RangeError("One value per predictor is needed");
  const row = [1, ...x];
  const names = ["intercept", ...fit.predictors];
  const value = row.reduce((s, v, j) => s + v * fit.coefficients[names[j]].value, 0);
  const leverage = quadraticForm(fit.xtxInverse, row);
  const stdErr = fit.residualStdErr * Math.sqrt(1 + leverage);
  const halfWidth = studentTQuantile(0.5 + level / 2, fit.dof) * stdErr;
  const maxLeverage = Math.max(...fit.leverage);
  return { value, halfWidth, stdErr, lower: value - halfWidth, upper: value + halfWidth, leverage, extrapolated: leverage > maxLeverage + 1e-12, level };
}
