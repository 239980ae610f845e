/**
 * The one place the lighting workflow talks to the colour engine's fits. Everything the /lighting
 * pages, the bench pipeline and re-derivation need from a calibration goes through here, so the
 * engine behind it can change in one file.
 *
 * Today it uses lib/color/correction.ts (von Kries scaling, 3×3 least squares, root-polynomial
 * degree 2), with leave-one-out residuals computed here. Pure: no database, no storage.
 */
import {
  applyCorrection,
  correctionFromArray,
  correctionToArray,
  fitMatrix3x3,
  fitRootPolynomial,
  fitWhiteScaling,
  type Correction,
  type CorrectionKind,
  type ReferencePatch,
} from "../color/correction";
import { linearSrgbToLab, type LabWhite } from "../color/convert";
import { deltaE00 } from "../color/difference";
import { ColorInputError } from "../color/errors";
import type { Lab, LinearRgb } from "../color/types";

export const PROFILE_METHODS = ["white", "matrix-3x3", "root-polynomial-2", "auto"] as const;
export type ProfileMethod = (typeof PROFILE_METHODS)[number];
export type FittedMethod = Exclude<ProfileMethod, "auto">;

/** One card patch as sampled from a photo: its raw linear RGB and its known Lab (under the card's white point). */
export type CardSample = { name: string; measured: LinearRgb; lab: Lab };

/** What a profile stores: enough to apply it again anywhere (see `applyCalibration`). */
export type StoredCalibration = {
  version: 1;
  method: FittedMethod;
  /** White point the card's Lab values were given under; the fit targets linear sRGB after Bradford adaptation. */
  whitePoint: LabWhite;
  correction: { kind: CorrectionKind; values: number[] };
};

export type PatchResidual = { patch: string; deltaE00: number; looDeltaE00: number };

export type CardFit = {
  method: FittedMethod;
  calibration: StoredCalibration;
  correction: Correction;
  residuals: PatchResidual[];
  trainingMean: number;
  trainingMax: number;
  looMean: number;
  looMax: number;
  /** Every method that could be fitted, with its leave-one-out figures (for "auto" and for the record). */
  candidates: { method: FittedMethod; looMean: number; looMax: number }[];
  /** Methods that could not be fitted and why (too few patches, too alike …). */
  refused: { method: FittedMethod; reason: string }[];
};

/** Neutral enough to scale by: C*ab ≤ 3 (common practice, no source). */
export const NEUTRAL_MAX_CHROMA = 3;
/** Bright enough to scale by: L* ≥ 50 (common practice, no source). */
export const WHITE_MIN_L = 50;

/** Approval tolerance by default: leave-one-out ΔE00 mean ≤ 2 and max ≤ 4 (common practice, no source). */
export const DEFAULT_TOLERANCE = { meanDeltaE00: 2, maxDeltaE00: 4 } as const;

const chroma = (lab: Lab) => Math.hypot(lab[1], lab[2]);
const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;

/** Root-polynomial degree 2 has 6 terms; it is allowed only with at least three times as many patches. */
export const ROOT_POLYNOMIAL_MIN_PATCHES = 18;

function toPatches(samples: readonly CardSample[]): ReferencePatch[] {
  return samples.map((s) => ({ measured: s.measured, referenceLab: s.lab }));
}

function fitOne(method: FittedMethod, samples: readonly CardSample[], white: LabWhite): Correction {
  switch (method) {
    case "white": {
      // von Kries from the brightest neutral patch; the card must have one.
      const neutrals = samples.filter((s) => chroma(s.lab) <= NEUTRAL_MAX_CHROMA && s.lab[0] >= WHITE_MIN_L);
      if (neutrals.length === 0) throw new ColorInputError("The card has no white or light grey patch (C*ab ≤ 3, L* ≥ 50) to scale by; add one or choose another method.");
      const brightest = neutrals.reduce((a, b) => (b.lab[0] > a.lab[0] ? b : a));
      return fitWhiteScaling({ measured: brightest.measured, referenceLab: brightest.lab }, white).correction;
    }
    case "matrix-3x3": {
      const chromatic = samples.filter((s) => chroma(s.lab) > NEUTRAL_MAX_CHROMA);
      if (chromatic.length < 3) throw new ColorInputError("A 3×3 matrix needs at least three coloured patches, not only greys; add red, green and blue patches to the card.");
      return fitMatrix3x3(toPatches(samples), white).correction;
    }
    case "root-polynomial-2":
      if (samples.length < ROOT_POLYNOMIAL_MIN_PATCHES) {
        throw new ColorInputError(
          `A root-polynomial fit needs at least ${ROOT_POLYNOMIAL_MIN_PATCHES} patches (three per term) and the card has ${samples.length}; use the 3×3 matrix.`,
        );
      }
      return fitRootPolynomial(toPatches(samples), 2, white).correction;
  }
}

function residual(correction: Correction, s: CardSample, white: LabWhite): number {
  return deltaE00(linearSrgbToLab(applyCorrection(correction, s.measured), white), s.lab);
}

function fitWithResiduals(method: FittedMethod, samples: readonly CardSample[], white: LabWhite) {
  const correction = fitOne(method, samples, white);
  const training = samples.map((s) => residual(correction, s, white));
  // Leave-one-out: refit without patch i and predict it (what the fit does on a colour it has not seen).
  const loo = samples.map((s, i) => {
    const rest = samples.filter((_, k) => k !== i);
    try {
      return residual(fitOne(method, rest, white), s, white);
    } catch {
      return Number.POSITIVE_INFINITY;
    }
  });
  return { correction, training, loo };
}

/**
 * Fits a card: one method, or "auto" = every method the card allows, chosen by the lowest
 * leave-one-out mean ΔE00. Throws `ColorInputError` (a sentence) when nothing can be fitted.
 */
export function fitCard(samples: readonly CardSample[], white: LabWhite, method: ProfileMethod): CardFit {
  if (samples.length < 4) throw new ColorInputError(`A card needs at least 4 patches of known Lab to fit a profile; this one has ${samples.length}.`);
  for (const s of samples) {
    if (s.measured.some((v) => v >= 0.99)) throw new ColorInputError(`Patch “${s.name}” is clipped in the photo; lower the exposure and photograph the card again.`);
  }
  const tried: FittedMethod[] = method === "auto" ? ["white", "matrix-3x3", "root-polynomial-2"] : [method];
  const fits: { method: FittedMethod; fit: ReturnType<typeof fitWithResiduals> }[] = [];
  const refused: { method: FittedMethod; reason: string }[] = [];
  for (const m of tried) {
    try {
      fits.push({ method: m, fit: fitWithResiduals(m, samples, white) });
    } catch (error) {
      if (!(error instanceof ColorInputError)) throw error;
      refused.push({ method: m, reason: error.message });
    }
  }
  if (fits.length === 0) throw new ColorInputError(refused[0]?.reason ?? "No calibration could be fitted to this card.");
  const candidates = fits.map((f) => ({ method: f.method, looMean: mean(f.fit.loo), looMax: Math.max(...f.fit.loo) }));
  const best = fits.reduce((a, b) => (mean(b.fit.loo) < mean(a.fit.loo) ? b : a));
  const { correction, training, loo } = best.fit;
  return {
    method: best.method,
    calibration: { version: 1, method: best.method, whitePoint: white, correction: correctionToArray(correction) },
    correction,
    residuals: samples.map((s, i) => ({ patch: s.name, deltaE00: training[i], looDeltaE00: loo[i] })),
    trainingMean: mean(training),
    trainingMax: Math.max(...training),
    looMean: mean(loo),
    looMax: Math.max(...loo),
    candidates,
    refused,
  };
}

/** The correction a profile row holds: its stored calibration if fitted since 0005, else the older kind + numbers. */
export function correctionOfProfile(p: { calibration: Record<string, unknown> | null; correctionKind: string; correction: number[] }): Correction {
  const cal = p.calibration as Partial<StoredCalibration> | null;
  if (cal?.version === 1 && cal.correction) return correctionFromArray(cal.correction.kind, cal.correction.values);
  return correctionFromArray(p.correctionKind, p.correction);
}

/** Applies a stored calibration to raw linear RGB; the result is linear sRGB. */
export function applyCalibration(calibration: StoredCalibration, rgb: LinearRgb): LinearRgb {
  return applyCorrection(correctionFromArray(calibration.correction.kind, calibration.correction.values), rgb);
}

/** Whether a fit is within the admin's approval tolerance, with the sentence to show when it is not. */
export function withinTolerance(fit: { looMean: number | null; looMax: number | null }, tolerance: { meanDeltaE00: number; maxDeltaE00: number } = DEFAULT_TOLERANCE): { ok: boolean; reason: string } {
  if (fit.looMean === null || fit.looMax === null) return { ok: false, reason: "This profile has no leave-one-out residuals yet; fit it from a card photo first." };
  if (fit.looMean > tolerance.meanDeltaE00) {
    return { ok: false, reason: `Leave-one-out mean ΔE00 ${fit.looMean.toFixed(2)} is above the tolerance ${tolerance.meanDeltaE00}; improve the light or the photo and fit again.` };
  }
  if (fit.looMax > tolerance.maxDeltaE00) {
    return { ok: false, reason: `Leave-one-out worst patch ΔE00 ${fit.looMax.toFixed(2)} is above the tolerance ${tolerance.maxDeltaE00}; check that patch for glare and fit again.` };
  }
  return { ok: true, reason: "" };
}
