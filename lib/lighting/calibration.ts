/**
 * The one place the lighting workflow talks to the colour engine's fits. Everything the /lighting
 * pages, the bench pipeline and re-derivation need from a calibration goes through here, so the
 * engine behind it can change in one file.
 *
 * New profiles hold the engine's serialised calibration (lib/color/calibration.ts: tone curves from
 * the greys, then white | 3×3 | root-polynomial-2 to XYZ under the card's white point, leave-one-out
 * residuals). Profiles fitted before that hold a `Correction` (lib/color/correction.ts) and stay
 * readable. Pure: no database, no storage.
 */
import { applyCalibration, CALIBRATION_LIMITS, fitCalibration, parseCalibration, type Calibration, type MethodComparison } from "../color/calibration";
import { applyCorrection, correctionFromArray, type Correction } from "../color/correction";
import { linearSrgbToLab, linearSrgbToXyz, type LabWhite } from "../color/convert";
import type { Mat3 } from "../color/matrix";
import type { Lab, LinearRgb, Xyz } from "../color/types";

export const PROFILE_METHODS = ["white", "matrix-3x3", "root-polynomial-2", "auto"] as const;
export type ProfileMethod = (typeof PROFILE_METHODS)[number];
export type FittedMethod = Exclude<ProfileMethod, "auto">;

/** One card patch as sampled from a photo: its raw camera RGB (with its spread) and its known Lab (under the card's white point). */
export type CardSample = { name: string; measured: LinearRgb; lab: Lab; sd?: LinearRgb; pixels?: number; clippedFraction?: number; flags?: string[] };

export type PatchResidual = { patch: string; deltaE00: number; looDeltaE00: number };

export type CardFit = {
  method: FittedMethod;
  /** The engine's serialisable calibration (stored in lighting_profiles.calibration). */
  calibration: Calibration;
  residuals: PatchResidual[];
  trainingMean: number;
  trainingMax: number;
  looMean: number;
  looMax: number;
  /**
   * Every method that could be fitted, with its leave-one-out figures (for "auto" and for the record):
   * plain, and over the card's hull patches only (extrapolation; null when none could be predicted).
   */
  candidates: { method: FittedMethod; looMean: number; looMax: number; hullLooMean: number | null }[];
  /** With "auto": why the method was chosen, with its figures; null otherwise. */
  selection: string | null;
  /** Methods that could not be fitted and why (too few patches, too alike …). */
  refused: { method: FittedMethod; reason: string }[];
  warnings: string[];
};

/** Neutral enough to scale by: C*ab ≤ 3 (common practice, no source; the engine's limit). */
export const NEUTRAL_MAX_CHROMA = CALIBRATION_LIMITS.neutralChroma;

/** Approval tolerance by default: leave-one-out ΔE00 mean ≤ 2 and max ≤ 4 (common practice, no source). */
export const DEFAULT_TOLERANCE = { meanDeltaE00: 2, maxDeltaE00: 4 } as const;

const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;

/**
 * Fits a card with the colour engine (lib/color/calibration.ts): tone linearisation from the greys,
 * then the method (or "auto": every method the card allows, the simplest one that no more flexible
 * method beats significantly on the card's hull, by leave-one-out ΔE00), to XYZ
 * under the card's own white point. Throws the engine's refusal (a `ColorInputError` with a sentence).
 */
export function fitCard(samples: readonly CardSample[], white: LabWhite, method: ProfileMethod): CardFit {
  const calibration = fitCalibration(
    samples.map((s) => ({ name: s.name, camera: s.measured, referenceLab: s.lab, sd: s.sd, pixels: s.pixels, clippedFraction: s.clippedFraction, flags: s.flags })),
    { method, whitePoint: white },
  );
  // A patch the rest cannot predict (null) counts as infinitely bad for approval.
  const loo = calibration.residuals.map((r) => r.looDeltaE00 ?? Number.POSITIVE_INFINITY);
  const training = calibration.residuals.map((r) => r.deltaE00);
  return {
    method: calibration.method,
    calibration,
    residuals: calibration.residuals.map((r, i) => ({ patch: samples[i].name, deltaE00: r.deltaE00, looDeltaE00: loo[i] })),
    trainingMean: mean(training),
    trainingMax: Math.max(...training),
    looMean: mean(loo),
    looMax: Math.max(...loo),
    candidates: calibration.comparison
      .filter((c) => c.meanLooDeltaE00 !== null)
      .map((c) => ({ method: c.method, looMean: c.meanLooDeltaE00!, looMax: c.maxLooDeltaE00 ?? Number.POSITIVE_INFINITY, hullLooMean: c.meanHullLooDeltaE00 ?? null })),
    selection: calibration.selection ?? null,
    refused: calibration.comparison.filter((c) => c.refusal).map((c) => ({ method: c.method, reason: c.refusal! })),
    warnings: calibration.warnings,
  };
}

/**
 * A profile's colour for raw camera RGB, as XYZ D65 (white Y = 100) and CIELAB D65, whichever form it
 * holds; `adaptation` is the day's 3×3 white adaptation (engine calibrations only).
 */
export function profileColour(p: { calibration: Record<string, unknown> | null; correctionKind: string; correction: number[] }, camera: LinearRgb, adaptation?: Mat3): { xyz: Xyz; lab: Lab } {
  const cal = calibrationOfProfile(p);
  if (cal) {
    const c = applyCalibration(cal, camera, adaptation);
    return { xyz: c.xyzD65, lab: c.labD65 };
  }
  const lin = applyCorrection(correctionOfProfile(p), camera);
  return { xyz: linearSrgbToXyz(lin, "D65"), lab: linearSrgbToLab(lin, "D65") };
}

/** The engine calibration a profile holds (fitted since 0005), or null for older rows (they hold a `Correction`). */
export function calibrationOfProfile(p: { calibration: Record<string, unknown> | null }): Calibration | null {
  if (!p.calibration || (p.calibration as { format?: string }).format !== "solvatlas-calibration") return null;
  return parseCalibration(p.calibration);
}

/**
 * What a profile's fit tried: every method with its leave-one-out ΔE00 (plain and over the card's hull
 * patches; the hull figure is absent for fits stored before it existed), the hull patches' names, and
 * why "auto" kept its method. Empty for profiles without an engine calibration. A stored calibration
 * that cannot be read (a damaged row) gives nothing tried and the sentence to show on that profile, so
 * one damaged profile does not break a list or a page.
 */
export function methodsTried(p: { calibration: Record<string, unknown> | null }): { methods: MethodComparison[]; hullPatches: string[]; selection: string | null; problem: string | null } {
  let cal: Calibration | null;
  try {
    cal = calibrationOfProfile(p);
  } catch {
    return { methods: [], hullPatches: [], selection: null, problem: "The stored calibration could not be read (damaged or not a Solvatlas calibration); fit the profile again from a card photo, reopening it as a draft first if it is approved." };
  }
  if (!cal) return { methods: [], hullPatches: [], selection: null, problem: null };
  return {
    methods: cal.comparison,
    hullPatches: cal.residuals.filter((r) => r.hull).map((r) => r.name),
    selection: cal.selection ?? null,
    problem: null,
  };
}

/** The older form of a profile's correction (profiles fitted before the engine calibration; the demo seed's). */
export function correctionOfProfile(p: { correctionKind: string; correction: number[] }): Correction {
  // Profiles with an engine calibration carry no older correction.
  if (p.correctionKind === "calibration") return { kind: "none" };
  return correctionFromArray(p.correctionKind, p.correction);
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
