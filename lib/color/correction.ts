import { labToLinearSrgb, linearSrgbToLab, type LabWhite } from "./convert";
import { deltaE00 } from "./difference";
import { ColorInputError } from "./errors";
import { leastSquares } from "./lstsq";
import type { Mat3 } from "./matrix";
import { mat3MulVec } from "./srgb";
import type { Lab, LinearRgb, Vec3 } from "./types";

/**
 * A light correction maps a camera's linear RGB (sRGB-decoded code values) to linear sRGB as it
 * would be under the reference conditions the patches' Lab values describe.
 */
export type Correction =
  | { kind: "none" }
  | { kind: "white-scaling"; gains: Vec3 }
  | { kind: "matrix-3x3"; matrix: Mat3 }
  | { kind: "root-polynomial"; terms: number[][] };

export type CorrectionKind = Correction["kind"];

/** A reference patch: its measured linear RGB in the photo and its known CIELAB. */
export type ReferencePatch = { measured: LinearRgb; referenceLab: Lab };

export type CorrectionFit = {
  correction: Correction;
  /** ΔE00 between each patch's corrected colour and its reference Lab, in patch order. */
  residuals: { deltaE00: number }[];
  /** Condition number of the fit's design matrix (1 for white scaling). */
  condition: number;
};

/**
 * Refusal limits for the fits (common practice, no single published source; the figures are what
 * this code measured). The 3×3 design matrix of a chart of 18 chromatic + 6 grey patches has a
 * condition number of about 5, and about 40 when every chroma is cut to a tenth; six greys with
 * camera noise of ±0.002 give about 800, and then the noise decides the matrix. Root-polynomial
 * terms are correlated by construction (the same chart: about 45 at degree 2, 10⁴–10⁵ at degree 3),
 * so they are allowed more.
 */
export const CORRECTION_LIMITS = {
  maxConditionMatrix: 100,
  maxConditionRootPolynomial: { 2: 1e4, 3: 1e6 },
  /** A reference channel darker than this (linear) cannot be scaled reliably: noise dominates. */
  minReferenceChannel: 0.01,
} as const;

function checkPatch(p: ReferencePatch, index: number): void {
  if (!p.measured.every(Number.isFinite) || !p.referenceLab.every(Number.isFinite)) {
    throw new ColorInputError(`Reference patch ${index + 1} has a value that is not a number; measure it again.`);
  }
  if (p.referenceLab[0] < 0 || p.referenceLab[0] > 100) {
    throw new ColorInputError(`Reference patch ${index + 1} has L* = ${p.referenceLab[0]}, outside 0–100; check its Lab values.`);
  }
}

function residualsOf(correction: Correction, patches: readonly ReferencePatch[], white: LabWhite): { deltaE00: number }[] {
  return patches.map((p) => ({ deltaE00: deltaE00(linearSrgbToLab(applyCorrection(correction, p.measured), white), p.referenceLab) }));
}

/**
 * von Kries scaling in linear RGB from one white or grey reference of known Lab: each channel is
 * multiplied by (reference linear sRGB) / (measured linear RGB). J. von Kries (1902), in the
 * diagonal form used for camera white balance. `white` is the white point of `referenceLab`.
 */
export function fitWhiteScaling(patch: ReferencePatch, white: LabWhite = "D65"): CorrectionFit {
  checkPatch(patch, 0);
  const target = labToLinearSrgb(patch.referenceLab, white);
  const names = ["red", "green", "blue"];
  for (let c = 0; c < 3; c++) {
    if (target[c] <= 0) {
      throw new ColorInputError(`The reference Lab has no ${names[c]} component in sRGB; use a white or grey reference for light correction.`);
    }
    if (!(patch.measured[c] >= CORRECTION_LIMITS.minReferenceChannel)) {
      throw new ColorInputError(
        `The reference patch is too dark in the ${names[c]} channel to scale by; expose the photo brighter or use a lighter grey reference.`,
      );
    }
  }
  const gains: Vec3 = [target[0] / patch.measured[0], target[1] / patch.measured[1], target[2] / patch.measured[2]];
  const correction: Correction = { kind: "white-scaling", gains };
  return { correction, residuals: residualsOf(correction, [patch], white), condition: 1 };
}

/** Root-polynomial terms of Finlayson, Mackiewicz & Hurlbert (2015), degree 1–3. */
export function rootPolynomialTerms(rgb: LinearRgb, degree: 1 | 2 | 3): number[] {
  const [r, g, b] = rgb.map((v) => Math.max(0, v));
  const t = [r, g, b];
  if (degree >= 2) t.push(Math.sqrt(r * g), Math.sqrt(g * b), Math.sqrt(r * b));
  if (degree >= 3) {
    t.push(Math.cbrt(r * g * g), Math.cbrt(g * b * b), Math.cbrt(r * b * b), Math.cbrt(g * r * r), Math.cbrt(b * g * g), Math.cbrt(b * r * r), Math.cbrt(r * g * b));
  }
  return t;
}

const TERM_COUNT: Record<number, 1 | 2 | 3> = { 3: 1, 6: 2, 13: 3 };

function fitLinear(
  patches: readonly ReferencePatch[],
  white: LabWhite,
  design: (rgb: LinearRgb) => number[],
  maxCondition: number,
  what: string,
): { rows: number[][]; condition: number } {
  const terms = design([1, 1, 1]).length;
  // Root-polynomial fits need three patches per term (Finlayson et al. 2015 fit 24–140 patches for
  // 6–13 terms): with fewer they follow the card's noise and extrapolate to tens of ΔE00 on
  // saturated dye colours outside the card's range. The 3×3 keeps its minimum of 4.
  const needed = terms > 3 ? 3 * terms : terms + 1;
  if (patches.length < needed) {
    throw new ColorInputError(`A ${what} needs at least ${needed} reference patches and ${patches.length} were given; add more patches of known Lab.`);
  }
  patches.forEach(checkPatch);
  const a = patches.map((p) => design(p.measured));
  const b = patches.map((p) => labToLinearSrgb(p.referenceLab, white));
  const { solutions, condition } = leastSquares(a, b);
  if (!Number.isFinite(condition) || condition > maxCondition) {
    throw new ColorInputError(
      `The reference patches are too alike to fit a ${what} (condition number ${Number.isFinite(condition) ? condition.toExponential(1) : "infinite"}); include patches of clearly different hue and lightness, such as red, green, blue and grey.`,
    );
  }
  return { rows: solutions, condition };
}

/**
 * 3×3 colour-correction matrix M minimising Σ‖M·measured − target‖² in linear RGB, the target being
 * each patch's reference Lab converted to linear sRGB. Needs ≥ 4 patches; refuses ill-conditioned
 * sets. Reports the residual ΔE00 of every patch.
 */
export function fitMatrix3x3(patches: readonly ReferencePatch[], white: LabWhite = "D65"): CorrectionFit {
  const { rows, condition } = fitLinear(patches, white, (rgb) => [rgb[0], rgb[1], rgb[2]], CORRECTION_LIMITS.maxConditionMatrix, "3×3 correction matrix");
  const matrix = rows.map((r) => [r[0], r[1], r[2]] as Vec3) as Mat3;
  const correction: Correction = { kind: "matrix-3x3", matrix };
  return { correction, residuals: residualsOf(correction, patches, white), condition };
}

/**
 * Root-polynomial colour correction (G. D. Finlayson, M. Mackiewicz, A. Hurlbert, "Color Correction
 * Using Root-Polynomial Regression", IEEE Trans. Image Process. 24(5), 1460–1470, 2015): like the
 * 3×3 fit but on the terms r, g, b, √rg, √gb, √rb (degree 2) and the cube-root terms (degree 3),
 * which keeps the correction independent of exposure. Needs three patches per term: 18 at degree 2,
 * 39 at degree 3 (so degree 3 is refused for a 24-patch card).
 */
export function fitRootPolynomial(patches: readonly ReferencePatch[], degree: 2 | 3 = 2, white: LabWhite = "D65"): CorrectionFit {
  const { rows, condition } = fitLinear(
    patches,
    white,
    (rgb) => rootPolynomialTerms(rgb, degree),
    CORRECTION_LIMITS.maxConditionRootPolynomial[degree],
    `degree-${degree} root-polynomial correction`,
  );
  const correction: Correction = { kind: "root-polynomial", terms: rows };
  return { correction, residuals: residualsOf(correction, patches, white), condition };
}

/** Applies a correction to camera linear RGB; the result is linear sRGB (may leave 0–1). */
export function applyCorrection(correction: Correction, rgb: LinearRgb): LinearRgb {
  switch (correction.kind) {
    case "none":
      return [rgb[0], rgb[1], rgb[2]];
    case "white-scaling":
      return [rgb[0] * correction.gains[0], rgb[1] * correction.gains[1], rgb[2] * correction.gains[2]];
    case "matrix-3x3":
      return mat3MulVec(correction.matrix, rgb);
    case "root-polynomial": {
      const degree = TERM_COUNT[correction.terms[0].length];
      const t = rootPolynomialTerms(rgb, degree);
      return correction.terms.map((row) => row.reduce((s, coef, i) => s + coef * t[i], 0)) as LinearRgb;
    }
  }
}

/** Flat storage form: the kind plus its numbers (gains 3, matrix 9 row-major, root-polynomial 3 × k row-major). */
export function correctionToArray(correction: Correction): { kind: CorrectionKind; values: number[] } {
  switch (correction.kind) {
    case "none":
      return { kind: "none", values: [] };
    case "white-scaling":
      return { kind: "white-scaling", values: [...correction.gains] };
    case "matrix-3x3":
      return { kind: "matrix-3x3", values: correction.matrix.flat() };
    case "root-polynomial":
      return { kind: "root-polynomial", values: correction.terms.flat() };
  }
}

/** Inverse of `correctionToArray`; throws `ColorInputError` if the numbers do not fit the kind. */
export function correctionFromArray(kind: string, values: readonly number[]): Correction {
  if (!values.every(Number.isFinite)) throw new ColorInputError("The stored correction holds a value that is not a number; fit the lighting profile again.");
  const wrong = () => new ColorInputError(`A ${kind} correction cannot have ${values.length} numbers; fit the lighting profile again.`);
  switch (kind) {
    case "none":
      if (values.length !== 0) throw wrong();
      return { kind: "none" };
    case "white-scaling":
      if (values.length !== 3) throw wrong();
      return { kind: "white-scaling", gains: [values[0], values[1], values[2]] };
    case "matrix-3x3":
      if (values.length !== 9) throw wrong();
      return { kind: "matrix-3x3", matrix: [0, 1, 2].map((i) => [values[3 * i], values[3 * i + 1], values[3 * i + 2]] as Vec3) as Mat3 };
    case "root-polynomial": {
      const k = values.length / 3;
      if (!TERM_COUNT[k] || k === 3) throw wrong();
      return { kind: "root-polynomial", terms: [0, 1, 2].map((i) => values.slice(i * k, (i + 1) * k)) };
    }
    default:
      throw new ColorInputError(`"${kind}" is not a known correction; use none, white-scaling, matrix-3x3 or root-polynomial.`);
  }
}
