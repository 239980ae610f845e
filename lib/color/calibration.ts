/**
 * Camera calibration from a photographed card of known CIELAB: tone linearisation from the card's
 * greys, then a colour correction from linearised camera RGB to CIE XYZ under the card's own white
 * point (D65, or D50 read as D50 and Bradford-adapted to D65 for output), with training and
 * leave-one-out residuals for every patch and refusals that say what to do.
 *
 * Pure: no database, no photo decoding. The camera values are a region's robust mean as
 * `measureRegion` gives it (sRGB-decoded code values, 0–1), so stored raw values can be re-derived.
 */
import { CalibrationError } from "./calibration-errors";
import { BRADFORD, bradfordAdaptation, type LabWhite } from "./convert";
import { deltaE00 } from "./difference";
import { WHITE_POINTS_2DEG } from "./illuminants";
import { leastSquares } from "./lstsq";
import { labToLch, labToXyz, xyzToLab } from "./lab";
import { mat3Inverse, mat3Mul, type Mat3 } from "./matrix";
import { mat3MulVec, SRGB_TO_XYZ_D65 } from "./srgb";
import { applyToneCurve, fitToneCurve, isValidToneCurve, TONE_CURVE_MIN_GREYS, type ToneCurve } from "./tone-curve";
import type { Lab, LinearRgb, Vec3, Xyz } from "./types";

export { CalibrationError } from "./calibration-errors";
export type { CalibrationRefusal } from "./calibration-errors";
export type { ToneCurve } from "./tone-curve";

export type CalibrationWhitePoint = LabWhite;
export type CalibrationMethod = "white" | "matrix-3x3" | "root-polynomial-2";
export type CalibrationMethodChoice = CalibrationMethod | "auto";
/** In order of flexibility (3, 9, 18 coefficients): "auto" relies on it. */
export const CALIBRATION_METHODS: readonly CalibrationMethod[] = ["white", "matrix-3x3", "root-polynomial-2"];

/** One patch of the card as measured in the photo, with its known colour. */
export type CalibrationPatch = {
  name: string;
  /** The region's robust mean as the engine stores it: sRGB-decoded code values, 0–1 (raw_r/g/b). */
  camera: LinearRgb;
  /** Known CIELAB under the target's white point (`whitePoint` of the fit). */
  referenceLab: Lab;
  /** Per-channel pixel standard deviation, same scale as `camera` (for uncertainty only). */
  sd?: LinearRgb;
  pixels?: number;
  /** Fraction of the region's pixels clipped in a channel (`measureRegion`'s clippedFraction). */
  clippedFraction?: number;
  /** Region flags from `measureRegion` ("near-clipping", "non-uniform", …). */
  flags?: string[];
};

export type CalibrationResidual = {
  /** 1-based, in the order the patches were given. */
  patch: number;
  name: string;
  /** ΔE00 between the fitted colour and the reference (both under the target's white). */
  deltaE00: number;
  /** ΔE00 when the patch is left out of the fit and predicted; null when the rest cannot fit the method. */
  looDeltaE00: number | null;
  neutral: boolean;
  /**
   * On the card's hull (see `hullPatches`): left out, this patch is an extrapolation, so its
   * leave-one-out residual is what a colour beyond the card can expect. Absent in calibrations
   * fitted before the hull figure existed.
   */
  hull?: boolean;
};

export type MethodComparison = {
  method: CalibrationMethod;
  /** Null when the method was refused for this card; `refusal` then says why. */
  meanDeltaE00: number | null;
  meanLooDeltaE00: number | null;
  maxLooDeltaE00: number | null;
  /**
   * Mean leave-one-out ΔE00 over the hull patches only (extrapolations); null when none could be
   * predicted, absent in calibrations fitted before the figure existed.
   */
  meanHullLooDeltaE00?: number | null;
  /** How many patches are on the hull. */
  hullPatchCount?: number;
  refusal?: string;
};

/** The serialisable calibration: everything needed to apply it, and how well it fitted. */
export type Calibration = {
  format: "solvatlas-calibration";
  version: 1;
  method: CalibrationMethod;
  whitePoint: CalibrationWhitePoint;
  /** Per-channel linearisation, or null when the card had fewer than 3 greys (camera values used as they are). */
  toneCurve: ToneCurve | null;
  /**
   * Rows X, Y, Z (relative to the target's white, white Y = 1) as linear combinations of the terms
   * of linearised camera RGB: r, g, b (white, matrix-3x3) or r, g, b, √rg, √gb, √rb (root-polynomial-2).
   */
  coefficients: number[][];
  /** White method only: the von Kries channel gains that `coefficients` contains. */
  gains?: Vec3;
  residuals: CalibrationResidual[];
  meanDeltaE00: number;
  maxDeltaE00: number;
  meanLooDeltaE00: number | null;
  maxLooDeltaE00: number | null;
  /**
   * Root mean square of the leave-one-out errors in L*, a*, b* (CIELAB D65), over the patches:
   * the calibration's Type A standard uncertainty per coordinate (JCGM 100:2008 §4.2).
   */
  looLabRmsD65: Vec3 | null;
  /** Mean and worst leave-one-out ΔE00 over the hull patches (`residuals[].hull`); absent in older calibrations. */
  meanHullLooDeltaE00?: number | null;
  maxHullLooDeltaE00?: number | null;
  /** 2-norm condition number of the fit's design matrix. */
  condition: number;
  patchCount: number;
  neutralCount: number;
  /** With method "auto" (and always for information): every method tried and its leave-one-out ΔE00, plain and on the hull. */
  comparison: MethodComparison[];
  /** With method "auto": why this method was kept, in plain words with the figures behind it. */
  selection?: string;
  /** Plain-language cautions that do not stop the fit. */
  warnings: string[];
};

export type FitCalibrationOptions = {
  method?: CalibrationMethodChoice;
  whitePoint?: CalibrationWhitePoint;
  /** Fit a tone curve from the greys (default true); false only to compare. */
  linearise?: boolean;
};

/** Limits behind the refusals (common practice, no single published source unless named). */
export const CALIBRATION_LIMITS = {
  /** A reference with C*ab at or below this is neutral (grey/white): common practice, no source. */
  neutralChroma: 3,
  /** A white reference must be at least this light (L*): a mid grey card still qualifies. Common practice, no source. */
  minWhiteL: 40,
  /** A white reference channel below this (0–1) is too dark to scale by: noise would set the gain. */
  minWhiteCamera: 0.02,
  /**
   * A patch mean at or above this (0–1, sRGB-decoded; code 250 of 255) is refused: the tone curve's
   * shoulder has no detail left there and a few more photons clip it.
   */
  clippedCamera: 0.955,
  /**
   * More clipped pixels than this fraction and the region's mean is biased (clipped pixels are
   * dropped): the patch is refused. A saturated patch may legitimately have one channel near code 0
   * without clipped pixels; that is allowed. Same figure as regions.ts's near-clipping flag.
   */
  maxClippedFraction: 0.02,
  /** 3×3 design matrices above this condition number are refused (see correction.ts for figures). */
  maxConditionMatrix: 100,
  /** Root-polynomial terms are correlated by construction and allowed more (≈ 45 on a full chart). */
  maxConditionRootPolynomial: 1e4,
  /**
   * Root-polynomial degree 2 needs at least this many patches per term (6 terms → 18 patches):
   * fewer, and it follows the card's noise and extrapolates badly to saturated dye colours.
   */
  rootPolynomialPatchesPerTerm: 3,
} as const;

const TERMS: Record<CalibrationMethod, number> = { white: 3, "matrix-3x3": 3, "root-polynomial-2": 6 };

/** Minimum number of patches per method. */
export function minimumPatches(method: CalibrationMethod): number {
  if (method === "white") return 1;
  if (method === "matrix-3x3") return 4;
  return CALIBRATION_LIMITS.rootPolynomialPatchesPerTerm * TERMS["root-polynomial-2"];
}

/**
 * Root-polynomial terms of degree 2: r, g, b, √(rg), √(gb), √(rb). G. D. Finlayson, M. Mackiewicz,
 * A. Hurlbert, "Color Correction Using Root-Polynomial Regression", IEEE Trans. Image Process.
 * 24(5), 1460–1470 (2015): every term scales linearly with exposure, so the correction does not
 * change with the brightness of the light.
 */
export function rootPolynomial2Terms(rgb: LinearRgb): number[] {
  const [r, g, b] = rgb.map((v) => Math.max(0, v));
  return [r, g, b, Math.sqrt(r * g), Math.sqrt(g * b), Math.sqrt(r * b)];
}

function termsOf(method: CalibrationMethod, rgb: LinearRgb): number[] {
  return method === "root-polynomial-2" ? rootPolynomial2Terms(rgb) : [rgb[0], rgb[1], rgb[2]];
}

/** XYZ (white Y = 1) relative to `white` → the same colour relative to D65, Bradford (Lam 1985). */
const TO_D65: Record<LabWhite, Mat3> = {
  D65: [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  D50: bradfordAdaptation(WHITE_POINTS_2DEG.D50, WHITE_POINTS_2DEG.D65),
};
const FROM_D65: Record<LabWhite, Mat3> = { D65: TO_D65.D65, D50: bradfordAdaptation(WHITE_POINTS_2DEG.D65, WHITE_POINTS_2DEG.D50) };

/** XYZ (Y of white = 1) under `white` of a CIELAB colour relative to `white`. */
function labToXyzUnit(lab: Lab, white: LabWhite): Xyz {
  const xyz = labToXyz(lab, WHITE_POINTS_2DEG[white]);
  return [xyz[0] / 100, xyz[1] / 100, xyz[2] / 100];
}

function xyzUnitToLab(xyz: Xyz, white: LabWhite): Lab {
  return xyzToLab([xyz[0] * 100, xyz[1] * 100, xyz[2] * 100], WHITE_POINTS_2DEG[white]);
}

function isNeutral(lab: Lab): boolean {
  return Math.hypot(lab[1], lab[2]) <= CALIBRATION_LIMITS.neutralChroma;
}

function label(p: CalibrationPatch, i: number): string {
  return p.name && p.name.trim() ? `"${p.name}"` : `${i + 1}`;
}

/** Refuses a patch that is not a number, clipped, non-uniform or (nearly) empty. */
function checkPatch(p: CalibrationPatch, i: number): void {
  if (!Array.isArray(p.camera) || p.camera.length !== 3 || !p.camera.every(Number.isFinite) || !Array.isArray(p.referenceLab) || p.referenceLab.length !== 3 || !p.referenceLab.every(Number.isFinite)) {
    throw new CalibrationError("invalid-patch", `Patch ${label(p, i)} has a value that is not a number; measure it again and give its L*, a*, b* as numbers.`);
  }
  if (p.referenceLab[0] < 0 || p.referenceLab[0] > 100) {
    throw new CalibrationError("invalid-patch", `Patch ${label(p, i)} has L* = ${p.referenceLab[0]}, outside 0–100; check its reference values.`);
  }
  const flags = p.flags ?? [];
  // Without the clipped fraction the region's near-clipping flag is all there is to go by.
  const clipped = p.clippedFraction !== undefined ? p.clippedFraction > CALIBRATION_LIMITS.maxClippedFraction : flags.includes("near-clipping");
  if (clipped || p.camera.some((v) => v >= CALIBRATION_LIMITS.clippedCamera) || p.camera.some((v) => v <= 0)) {
    throw new CalibrationError(
      "clipped-patch",
      `Patch ${label(p, i)} is clipped or close to clipping in the photo; lower the exposure (or lighten the shadows) so every patch stays clear of pure white and pure black, and photograph the card again.`,
    );
  }
  // "much-rejected": over 30 % of the pixels were outliers, so the region straddles an edge or glare.
  if (flags.includes("non-uniform") || flags.includes("much-rejected")) {
    throw new CalibrationError("non-uniform-patch", `Patch ${label(p, i)} is not one even colour in the photo (glare, shadow or an edge); move its region onto the middle of the patch.`);
  }
  if (flags.includes("too-few-pixels") || (p.pixels !== undefined && p.pixels < 1)) {
    throw new CalibrationError("empty-patch", `Patch ${label(p, i)} has too few usable pixels; make its region larger or move it off glare and edges.`);
  }
}

/**
 * Checks a white (or grey) reference before anything is scaled by it: neutral (C*ab ≤ 3, common
 * practice, no source), light enough (L* ≥ 40) and, if its camera value is given, bright enough and
 * unclipped in every channel.
 */
export function checkWhiteReference(referenceLab: Lab, camera?: LinearRgb, flags: readonly string[] = []): void {
  const chroma = Math.hypot(referenceLab[1], referenceLab[2]);
  if (!(chroma <= CALIBRATION_LIMITS.neutralChroma)) {
    throw new CalibrationError(
      "white-not-neutral",
      `The white reference is not neutral (C*ab ${chroma.toFixed(1)}, above ${CALIBRATION_LIMITS.neutralChroma}); use a white or grey patch whose a* and b* are close to 0.`,
    );
  }
  if (!(referenceLab[0] >= CALIBRATION_LIMITS.minWhiteL)) {
    throw new CalibrationError("white-too-dark", `The white reference is too dark (L* ${referenceLab[0]}, below ${CALIBRATION_LIMITS.minWhiteL}) to scale by; use a white or light grey patch.`);
  }
  if (camera) {
    if (flags.includes("clipped") || camera.some((v) => v >= CALIBRATION_LIMITS.clippedCamera)) {
      throw new CalibrationError("clipped-patch", "The white reference is clipped or close to clipping in the photo; lower the exposure so it is not pure white.");
    }
    if (camera.some((v) => !(v >= CALIBRATION_LIMITS.minWhiteCamera))) {
      throw new CalibrationError("white-too-dark", "The white reference is too dark in the photo to scale by; expose the photo brighter or light the reference better.");
    }
  }
}

/** Linear sRGB (D65) → XYZ relative to `white`, white Y = 1: the white method's fixed primaries. */
function srgbToXyzUnder(white: LabWhite): Mat3 {
  return mat3Mul(FROM_D65[white], SRGB_TO_XYZ_D65 as Mat3);
}

type CoreFit = { method: CalibrationMethod; coefficients: number[][]; gains?: Vec3; condition: number };

function predictXyz(fit: { method: CalibrationMethod; coefficients: number[][] }, lin: LinearRgb): Xyz {
  const t = termsOf(fit.method, lin);
  return fit.coefficients.map((row) => row.reduce((s, c, k) => s + c * t[k], 0)) as Xyz;
}

/** The colour correction alone, on already linearised camera values. */
function fitCore(method: CalibrationMethod, lin: readonly LinearRgb[], patches: readonly CalibrationPatch[], white: LabWhite): CoreFit {
  const n = patches.length;
  const need = minimumPatches(method);
  if (n < need) {
    const why = method === "root-polynomial-2" ? ` (three per term of its ${TERMS[method]} terms)` : "";
    throw new CalibrationError("too-few-patches", `The ${methodName(method)} needs at least ${need} patches${why} and ${n} were given; add more patches of known colour or choose a simpler method.`);
  }
  const targets = patches.map((p) => labToXyzUnit(p.referenceLab, white));
  if (method === "white") {
    const neutral = patches.map((p, i) => i).filter((i) => isNeutral(patches[i].referenceLab));
    if (neutral.length === 0) {
      throw new CalibrationError("no-white", "The white method needs a white or grey patch (C*ab ≤ 3); add one to the patches.");
    }
    // von Kries (1902) in the camera's own channels: one gain per channel, least squares over the
    // neutral patches, the camera's primaries taken as sRGB's.
    const toXyz = srgbToXyzUnder(white);
    const fromXyz = mat3Inverse(toXyz);
    const brightest = neutral.reduce((a, b) => (patches[b].referenceLab[0] > patches[a].referenceLab[0] ? b : a));
    checkWhiteReference(patches[brightest].referenceLab, lin[brightest]);
    const gains = [0, 1, 2].map((c) => {
      let num = 0;
      let den = 0;
      for (const i of neutral) {
        const t = mat3MulVec(fromXyz, targets[i]);
        num += lin[i][c] * t[c];
        den += lin[i][c] * lin[i][c];
      }
      return num / den;
    }) as Vec3;
    const coefficients = toXyz.map((row) => row.map((v, c) => v * gains[c]));
    return { method, coefficients, gains, condition: 1 };
  }
  if (patches.every((p) => isNeutral(p.referenceLab))) {
    throw new CalibrationError(
      "greys-only",
      `Grey patches alone cannot determine a ${methodName(method)}: they say nothing about how the camera sees colour; add coloured patches (red, green, blue, yellow, …) or use the white method.`,
    );
  }
  const design = lin.map((v) => termsOf(method, v));
  const { solutions, condition } = leastSquares(design, targets);
  const limit = method === "matrix-3x3" ? CALIBRATION_LIMITS.maxConditionMatrix : CALIBRATION_LIMITS.maxConditionRootPolynomial;
  if (!Number.isFinite(condition) || condition > limit || solutions.length !== 3 || !solutions.flat().every(Number.isFinite)) {
    throw new CalibrationError(
      "singular-fit",
      `The patches are too alike to fit a ${methodName(method)} (condition number ${Number.isFinite(condition) ? condition.toExponential(1) : "infinite"}); include patches of clearly different hue and lightness, such as red, green, blue, yellow and greys.`,
    );
  }
  return { method, coefficients: solutions, condition };
}

export function methodName(method: CalibrationMethod): string {
  if (method === "white") return "white (von Kries) scaling";
  if (method === "matrix-3x3") return "3×3 matrix";
  return "degree-2 root-polynomial correction";
}

type FullFit = { toneCurve: ToneCurve | null; core: CoreFit };

function greysOf(patches: readonly CalibrationPatch[], white: LabWhite) {
  return patches
    .filter((p) => isNeutral(p.referenceLab))
    .map((p) => ({ name: p.name, camera: p.camera, luminance: labToXyzUnit(p.referenceLab, white)[1] }));
}

function fitFull(method: CalibrationMethod, patches: readonly CalibrationPatch[], white: LabWhite, linearise: boolean, fallbackTone: ToneCurve | null): FullFit {
  const greys = greysOf(patches, white);
  const toneCurve = linearise && greys.length >= TONE_CURVE_MIN_GREYS ? fitToneCurve(greys) : fallbackTone;
  const lin = patches.map((p) => (toneCurve ? applyToneCurve(toneCurve, p.camera) : p.camera));
  return { toneCurve, core: fitCore(method, lin, patches, white) };
}

function predictLab(fit: FullFit, camera: LinearRgb, white: LabWhite): Lab {
  const lin = fit.toneCurve ? applyToneCurve(fit.toneCurve, camera) : camera;
  return xyzUnitToLab(predictXyz(fit.core, lin), white);
}

function labD65Of(lab: Lab, white: LabWhite): Lab {
  if (white === "D65") return lab;
  const xyz = mat3MulVec(TO_D65.D50, labToXyzUnit(lab, "D50"));
  return xyzUnitToLab(xyz, "D65");
}

const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;

/**
 * The card's hull: the patches that, left out, have to be extrapolated, so that their leave-one-out
 * residuals show how a method does on colours beyond the card (a plain leave-one-out mean is mostly
 * interpolation and favours the more flexible method).
 *
 * Every correction here is homogeneous of degree 1 in linearised camera RGB (a matrix; root-polynomial
 * terms scale with exposure), so how far a colour lies beyond the card is a matter of its chromaticity:
 * the hull is the vertices of the convex hull of the patches' camera chromaticities r/(r+g+b),
 * g/(r+g+b) (monotone chain: A. M. Andrew, "Another efficient algorithm for convex hulls in two
 * dimensions", Inf. Process. Lett. 9(5), 216–219, 1979); a patch in the middle of an edge, or the
 * twin of another, is not a vertex. The tone curve extrapolates in lightness instead: when a grey can
 * be spared (`toneRefitted`: the curve is refitted without it), the lightest and the darkest grey are
 * on the hull too. Which patches count is a design choice (common practice, no source).
 *
 * Returns indices into `patches`, ascending.
 */
export function hullPatches(patches: readonly CalibrationPatch[], linear: readonly LinearRgb[], toneRefitted: boolean): number[] {
  const points = linear.flatMap((v, i) => {
    const sum = v[0] + v[1] + v[2];
    return sum > 0 && v.every(Number.isFinite) ? [{ i, x: v[0] / sum, y: v[1] / sum }] : [];
  });
  points.sort((a, b) => a.x - b.x || a.y - b.y);
  type P = (typeof points)[number];
  const cross = (o: P, a: P, b: P) => (a.x - o.x) * (b.y - o.y) - (a.y - o.y) * (b.x - o.x);
  const chain = (ordered: P[]) => {
    const out: P[] = [];
    for (const p of ordered) {
      while (out.length >= 2 && cross(out[out.length - 2], out[out.length - 1], p) <= 0) out.pop();
      out.push(p);
    }
    return out.slice(0, -1);
  };
  const hull = new Set(points.length < 3 ? points.map((p) => p.i) : [...chain(points), ...chain([...points].reverse())].map((p) => p.i));
  const greys = patches.map((_, i) => i).filter((i) => isNeutral(patches[i].referenceLab));
  if (toneRefitted && greys.length > 0) {
    greys.sort((a, b) => patches[a].referenceLab[0] - patches[b].referenceLab[0]);
    hull.add(greys[0]);
    hull.add(greys[greys.length - 1]);
  }
  return [...hull].sort((a, b) => a - b);
}

function fitMethod(method: CalibrationMethod, patches: readonly CalibrationPatch[], white: LabWhite, linearise: boolean): Calibration {
  const full = fitFull(method, patches, white, linearise, null);
  const warnings: string[] = [];
  const neutralCount = patches.filter((p) => isNeutral(p.referenceLab)).length;
  if (!full.toneCurve && linearise) {
    warnings.push(
      `The card has ${neutralCount} grey patch${neutralCount === 1 ? "" : "es"} and the tone curve needs ${TONE_CURVE_MIN_GREYS}: the camera's values were used as if they were sRGB, which a phone's JPEG is not; add greys for accurate colours.`,
    );
  }
  const looLabs: (Lab | null)[] = [];
  const residuals: CalibrationResidual[] = patches.map((p, i) => {
    const deltaE = deltaE00(predictLab(full, p.camera, white), p.referenceLab);
    let looLab: Lab | null = null;
    try {
      // Leave-one-out refits everything the patch influenced: the tone curve (when ≥ 3 greys remain,
      // otherwise the full card's curve) and the correction.
      const fit = fitFull(method, patches.filter((_, j) => j !== i), white, linearise, full.toneCurve);
      looLab = predictLab(fit, p.camera, white);
    } catch (error) {
      if (!(error instanceof CalibrationError)) throw error;
    }
    looLabs.push(looLab);
    return { patch: i + 1, name: p.name, deltaE00: deltaE, looDeltaE00: looLab ? deltaE00(looLab, p.referenceLab) : null, neutral: isNeutral(p.referenceLab) };
  });
  const looPairs = looLabs.flatMap((lab, i) => (lab ? [{ predicted: labD65Of(lab, white), known: labD65Of(patches[i].referenceLab, white) }] : []));
  const looLabRmsD65: Vec3 | null =
    looPairs.length > 0 ? ([0, 1, 2].map((k) => Math.sqrt(mean(looPairs.map(({ predicted, known }) => (predicted[k] - known[k]) ** 2)))) as Vec3) : null;
  const linear = patches.map((p) => (full.toneCurve ? applyToneCurve(full.toneCurve, p.camera) : p.camera));
  // The LOO refit has its own tone curve only when ≥ TONE_CURVE_MIN_GREYS greys remain (fitFull).
  const hull = new Set(hullPatches(patches, linear, Boolean(full.toneCurve) && linearise && neutralCount > TONE_CURVE_MIN_GREYS));
  residuals.forEach((r, i) => (r.hull = hull.has(i)));
  const hullLoos = residuals.filter((r) => r.hull && r.looDeltaE00 !== null).map((r) => r.looDeltaE00 as number);
  const loos = residuals.map((r) => r.looDeltaE00).filter((v): v is number => v !== null);
  if (loos.length < residuals.length) {
    warnings.push(`${residuals.length - loos.length} of the ${residuals.length} patches could not be predicted with themselves left out; their leave-one-out residual is missing.`);
  }
  return {
    format: "solvatlas-calibration",
    version: 1,
    method,
    whitePoint: white,
    toneCurve: full.toneCurve,
    coefficients: full.core.coefficients,
    ...(full.core.gains ? { gains: full.core.gains } : {}),
    residuals: residuals,
    meanDeltaE00: mean(residuals.map((r) => r.deltaE00)),
    maxDeltaE00: Math.max(...residuals.map((r) => r.deltaE00)),
    meanLooDeltaE00: loos.length ? mean(loos) : null,
    maxLooDeltaE00: loos.length ? Math.max(...loos) : null,
    looLabRmsD65,
    meanHullLooDeltaE00: hullLoos.length ? mean(hullLoos) : null,
    maxHullLooDeltaE00: hullLoos.length ? Math.max(...hullLoos) : null,
    condition: full.core.condition,
    patchCount: patches.length,
    neutralCount,
    comparison: [],
    warnings,
  };
}

/**
 * One-sided 95 % quantiles of Student's t for 1–30 degrees of freedom, then 40, 60 and 120
 * (NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2, "Critical values of the Student's t
 * distribution"); between listed values the one for fewer degrees of freedom (the stricter) is used.
 */
const T_95_ONE_SIDED = [
  6.314, 2.92, 2.353, 2.132, 2.015, 1.943, 1.895, 1.86, 1.833, 1.812, 1.796, 1.782, 1.771, 1.761, 1.753, 1.746, 1.74, 1.734, 1.729, 1.725, 1.721, 1.717, 1.714, 1.711, 1.708,
  1.706, 1.703, 1.701, 1.699, 1.697,
];
function t95OneSided(df: number): number {
  if (df <= 30) return T_95_ONE_SIDED[df - 1];
  return df < 40 ? 1.697 : df < 60 ? 1.684 : df < 120 ? 1.671 : 1.658;
}

/** What the more flexible method gains over the simpler on the hull patches: paired mean and its standard error. */
function hullAdvantage(simpler: Calibration, flexible: Calibration): { n: number; mean: number; se: number } | null {
  const d = simpler.residuals.flatMap((r, i) => {
    const other = flexible.residuals[i];
    return r.hull && r.looDeltaE00 !== null && other.looDeltaE00 !== null ? [r.looDeltaE00 - other.looDeltaE00] : [];
  });
  if (d.length < 2) return null;
  const m = mean(d);
  const sd = Math.sqrt(d.reduce((s, x) => s + (x - m) ** 2, 0) / (d.length - 1));
  return { n: d.length, mean: m, se: sd / Math.sqrt(d.length) };
}

/**
 * The "auto" choice between fitted methods, `fitted` in order of flexibility (white: 3 gains, 3×3: 9
 * coefficients, root-polynomial-2: 18). Starting from the simplest, a more flexible method replaces
 * the one kept only if
 * 1. it is better on the hull patches (extrapolation, see `hullPatches`) by a significant margin: the
 *    mean paired difference of their leave-one-out ΔE00 exceeds the one-sided 95 % Student t quantile
 *    times its standard error (a paired t-test at 5 %), and
 * 2. its plain leave-one-out mean (interpolation) is not worse.
 * The burden of proof lies on the extra coefficients, as in the "one standard error" rule of
 * L. Breiman, J. Friedman, R. Olshen, C. Stone, "Classification and Regression Trees" (1984) §3.4.3,
 * and T. Hastie, R. Tibshirani, J. Friedman, "The Elements of Statistical Learning" (2nd ed., 2009)
 * §7.10; the paired test on the hull patches in its place is a design choice (common practice, no
 * source). Paired tests on leave-one-out errors are known to be too ready to find a difference
 * (T. G. Dietterich, Neural Comput. 10(7), 1895–1923, 1998), which errs towards the simpler method.
 * A kept method with no leave-one-out figure at all gives way to one that has them.
 *
 * Neither figure sees everything: a more flexible method can also follow the card's own spectra and do
 * worse on spectra unlike them (dyes under a tungsten lamp, tests/unit/color-calibration.test.ts), even
 * inside the card's hull. There the hull narrows its lead without reversing it, and the significance
 * test is what keeps the simpler method.
 */
function chooseMethod(fitted: readonly Calibration[]): { cal: Calibration; selection: string } {
  let kept = fitted[0];
  const steps: string[] = [];
  const f2 = (v: number) => v.toFixed(2);
  for (const next of fitted.slice(1)) {
    const a = methodName(kept.method);
    const b = methodName(next.method);
    if (kept.meanLooDeltaE00 === null) {
      if (next.meanLooDeltaE00 !== null) {
        steps.push(`The ${b} was preferred to the ${a}, which could not be checked by leaving patches out.`);
        kept = next;
      }
      continue;
    }
    if (next.meanLooDeltaE00 === null) continue;
    const gain = hullAdvantage(kept, next);
    if (!gain) {
      steps.push(`The ${a} was kept: too few patches on the card's hull to tell whether the ${b} extrapolates better.`);
      continue;
    }
    const margin = t95OneSided(gain.n - 1) * gain.se;
    const significant = gain.se > 0 ? gain.mean > margin : gain.mean > 0;
    const over = `mean ± standard error of the paired difference over ${gain.n} hull patches`;
    const figures = `${f2(gain.mean)} ± ${f2(gain.se)} ΔE00 (${over})`;
    if (gain.mean <= 0) {
      steps.push(`The ${a} was kept: the ${b} is no better on the card's hull (worse by ${f2(-gain.mean)} ± ${f2(gain.se)} ΔE00, ${over}).`);
    } else if (significant && next.meanLooDeltaE00 <= kept.meanLooDeltaE00) {
      steps.push(`The ${b} replaced the ${a}: it is better on the card's hull by ${figures}, more than the ${f2(margin)} ΔE00 a one-sided t-test at 5 % asks, and not worse on the plain leave-one-out mean (${f2(next.meanLooDeltaE00)} vs ${f2(kept.meanLooDeltaE00)}).`);
      kept = next;
    } else if (significant) {
      steps.push(`The ${a} was kept: the ${b} is better on the card's hull by ${figures} but worse on the plain leave-one-out mean (${f2(next.meanLooDeltaE00)} vs ${f2(kept.meanLooDeltaE00)}).`);
    } else {
      steps.push(`The ${a} was kept: the ${b} is better on the card's hull by ${figures}, less than the ${f2(margin)} ΔE00 a one-sided t-test at 5 % asks, so the method with fewer coefficients is used.`);
    }
  }
  return { cal: kept, selection: steps.join(" ") };
}

/**
 * Fits a calibration from card patches. `method` defaults to "matrix-3x3"; "auto" fits every method
 * the card can support and keeps the simplest one that no more flexible method beats significantly on
 * the card's hull (extrapolation; see `chooseMethod`), each method's figures in `comparison` and the
 * reason in `selection`. Throws CalibrationError with one clear sentence when refused.
 */
export function fitCalibration(patches: readonly CalibrationPatch[], options: FitCalibrationOptions = {}): Calibration {
  const choice = options.method ?? "matrix-3x3";
  const white = options.whitePoint ?? "D65";
  const linearise = options.linearise ?? true;
  if (white !== "D65" && white !== "D50") {
    throw new CalibrationError("invalid-patch", `The white point must be D65 or D50, not "${String(white)}"; give the white point the reference values were measured under.`);
  }
  if (choice !== "auto" && !CALIBRATION_METHODS.includes(choice)) {
    throw new CalibrationError("unknown-method", `"${String(choice)}" is not a calibration method; use white, matrix-3x3, root-polynomial-2 or auto.`);
  }
  if (patches.length === 0) throw new CalibrationError("too-few-patches", "No patches were given; mark the card's patches and give their known colours.");
  patches.forEach(checkPatch);

  if (choice !== "auto") {
    const cal = fitMethod(choice, patches, white, linearise);
    cal.comparison = [summary(cal)];
    return cal;
  }
  const tried = CALIBRATION_METHODS.map((method) => {
    try {
      return { method, cal: fitMethod(method, patches, white, linearise) };
    } catch (error) {
      if (error instanceof CalibrationError) return { method, error };
      throw error;
    }
  });
  const comparison: MethodComparison[] = tried.map((t) =>
    "cal" in t && t.cal ? summary(t.cal) : { method: t.method, meanDeltaE00: null, meanLooDeltaE00: null, maxLooDeltaE00: null, meanHullLooDeltaE00: null, refusal: (t as { error: Error }).error.message },
  );
  const fitted = tried.filter((t): t is { method: CalibrationMethod; cal: Calibration } => "cal" in t && Boolean(t.cal));
  if (fitted.length === 0) throw (tried[1] as { error: Error }).error ?? (tried[0] as { error: Error }).error;
  // `tried` follows CALIBRATION_METHODS: least flexible first.
  const { cal: best, selection } = chooseMethod(fitted.map((t) => t.cal));
  best.comparison = comparison;
  if (selection) best.selection = selection;
  return best;
}

function summary(cal: Calibration): MethodComparison {
  return {
    method: cal.method,
    meanDeltaE00: cal.meanDeltaE00,
    meanLooDeltaE00: cal.meanLooDeltaE00,
    maxLooDeltaE00: cal.maxLooDeltaE00,
    meanHullLooDeltaE00: cal.meanHullLooDeltaE00 ?? null,
    hullPatchCount: cal.residuals.filter((r) => r.hull).length,
  };
}

export type CalibratedColour = {
  /** Linearised camera RGB (after the tone curve). */
  linear: LinearRgb;
  /** XYZ relative to the calibration's white point, white Y = 100. */
  xyz: Xyz;
  whitePoint: CalibrationWhitePoint;
  /** XYZ relative to D65 (Bradford from D50 targets), white Y = 100. */
  xyzD65: Xyz;
  labD65: Lab;
  /** CIELAB relative to D65 or D50 (D50 by Bradford from the D65 value, as everywhere in Solvatlas). */
  lab: (white: LabWhite) => Lab;
};

/**
 * Applies a calibration to a camera value (sRGB-decoded, 0–1, as stored). `adaptation` is an
 * optional XYZ D65 → XYZ D65 matrix applied last (see `whiteAdaptation`): the day's white reference.
 */
export function applyCalibration(cal: Calibration, camera: LinearRgb, adaptation?: Mat3): CalibratedColour {
  const linear = cal.toneCurve ? applyToneCurve(cal.toneCurve, camera) : ([camera[0], camera[1], camera[2]] as LinearRgb);
  const xyzUnit = predictXyz(cal, linear);
  let d65 = mat3MulVec(TO_D65[cal.whitePoint], xyzUnit);
  if (adaptation) d65 = mat3MulVec(adaptation, d65);
  const xyzD65: Xyz = [d65[0] * 100, d65[1] * 100, d65[2] * 100];
  const labD65 = xyzToLab(xyzD65, WHITE_POINTS_2DEG.D65);
  const xyz = adaptation ? (mat3MulVec(FROM_D65[cal.whitePoint], d65).map((v) => v * 100) as Xyz) : (xyzUnit.map((v) => v * 100) as Xyz);
  return {
    linear,
    xyz,
    whitePoint: cal.whitePoint,
    xyzD65,
    labD65,
    lab: (white) => (white === "D65" ? labD65 : xyzToLab(mat3MulVec(FROM_D65.D50, xyzD65), WHITE_POINTS_2DEG.D50)),
  };
}

/**
 * The day's white reference after the calibration: a von Kries adaptation in the Bradford cone space
 * (J. von Kries 1902; K. M. Lam 1985 for the matrix, as in ICC.1 Annex E) that moves the reference as
 * the calibration sees it onto its known colour, M = B⁻¹·diag(B·known / B·seen)·B on XYZ D65. This
 * takes out exposure and light drift since the card photo. The reference is checked first.
 */
export function whiteAdaptation(cal: Calibration, camera: LinearRgb, referenceLab: Lab, referenceWhite: LabWhite, flags: readonly string[] = []): Mat3 {
  checkWhiteReference(referenceLab, camera, flags);
  const seen = applyCalibration(cal, camera).xyzD65;
  const known = mat3MulVec(TO_D65[referenceWhite], labToXyz(referenceLab, WHITE_POINTS_2DEG[referenceWhite]));
  const s = mat3MulVec(BRADFORD, seen);
  const k = mat3MulVec(BRADFORD, known);
  if (!s.every((v) => v > 0)) throw new CalibrationError("white-too-dark", "The white reference comes out black through the calibration; check that its region is on the white patch.");
  return mat3Mul(mat3Inverse(BRADFORD), mat3Mul([[k[0] / s[0], 0, 0], [0, k[1] / s[1], 0], [0, 0, k[2] / s[2]]], BRADFORD));
}

/** Chroma of a reference (C*ab), for the neutral test shown to people. */
export function referenceChroma(lab: Lab): number {
  return labToLch(lab)[1];
}

const INVALID = "The calibration file is not a Solvatlas calibration or is damaged; make it again with the calibrate command or the lighting page.";

/**
 * Reads a calibration from parsed JSON (a file, a database column). Checks the format, version,
 * method, white point, tone curve and coefficient shape; throws CalibrationError otherwise.
 */
export function parseCalibration(value: unknown): Calibration {
  if (!value || typeof value !== "object") throw new CalibrationError("invalid-calibration", INVALID);
  const c = value as Partial<Calibration>;
  if (c.format !== "solvatlas-calibration" || typeof c.version !== "number") throw new CalibrationError("invalid-calibration", INVALID);
  if (c.version > 1) {
    throw new CalibrationError("invalid-calibration", `The calibration was made by a newer Solvatlas (format version ${c.version}); update Solvatlas or fit the calibration again.`);
  }
  if (!CALIBRATION_METHODS.includes(c.method as CalibrationMethod) || (c.whitePoint !== "D65" && c.whitePoint !== "D50")) throw new CalibrationError("invalid-calibration", INVALID);
  if (c.toneCurve !== null && !isValidToneCurve(c.toneCurve)) throw new CalibrationError("invalid-calibration", INVALID);
  const k = TERMS[c.method as CalibrationMethod];
  if (!Array.isArray(c.coefficients) || c.coefficients.length !== 3 || !c.coefficients.every((row) => Array.isArray(row) && row.length === k && row.every((v) => typeof v === "number" && Number.isFinite(v)))) {
    throw new CalibrationError("invalid-calibration", INVALID);
  }
  if (!Array.isArray(c.residuals)) throw new CalibrationError("invalid-calibration", INVALID);
  const optionalFigure = (v: unknown) => v === undefined || v === null || (typeof v === "number" && Number.isFinite(v) && v >= 0);
  if (!optionalFigure(c.meanHullLooDeltaE00) || !optionalFigure(c.maxHullLooDeltaE00) || (c.selection !== undefined && typeof c.selection !== "string")) {
    throw new CalibrationError("invalid-calibration", INVALID);
  }
  const rms = c.looLabRmsD65;
  if (rms !== undefined && rms !== null && !(Array.isArray(rms) && rms.length === 3 && rms.every((v) => typeof v === "number" && Number.isFinite(v) && v >= 0))) {
    throw new CalibrationError("invalid-calibration", INVALID);
  }
  return {
    comparison: [],
    warnings: [],
    looLabRmsD65: null,
    meanLooDeltaE00: null,
    maxLooDeltaE00: null,
    condition: NaN,
    patchCount: c.residuals.length,
    neutralCount: 0,
    meanDeltaE00: NaN,
    maxDeltaE00: NaN,
    ...c,
  } as Calibration;
}
