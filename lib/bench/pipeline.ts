/**
 * From a decoded rack photo to corrected colours: measure every vial and reference region in one pass,
 * build the light correction, apply it, and say what is doubtful about each result.
 *
 * The correction is the lighting profile's (fitted once per light and camera by an admin), followed by
 * von Kries scaling from the white/grey reference(s) marked in this very photo, which takes out the
 * day's exposure and light drift. Both steps fold into one correction of the profile's kind (a diagonal
 * scaling times a matrix is a matrix; times root-polynomial rows is root-polynomial rows), so the
 * stored correction re-derives every stored colour from its raw linear RGB.
 *
 * Pure: no database, no storage.
 */
import { applyCorrection, correctionToArray, fitWhiteScaling, type Correction } from "../color/correction";
import { labD50ToLabD65, labToLinearSrgb, linearSrgbToLab } from "../color/convert";
import { NEUTRAL_MAX_CHROMA } from "../lighting/calibration";
import { applyCalibration, whiteAdaptation, type Calibration } from "../color/calibration";
import { measureCalibratedColour } from "../color/calibrated-measure";
import { colourUncertainty, type PhotoEncoding } from "../color/uncertainty";
import { deltaE00 } from "../color/difference";
import { colourOfRegion } from "../color/measure";
import { ColorInputError, measureRegion, type DecodedPhoto, type RegionSpec, type RegionStats } from "../color/regions";
import type { Lab, Lch, LinearRgb, Vec3, Xyz } from "../color/types";

/** Photo-level flags added to every vial's own quality flags. */
export type PipelineFlag = "uncorrected" | "reference-drift" | "profile-not-valid-then" | "white-card-only";

/**
 * Above this ΔE00 between a reference as the profile sees it and its known Lab, the light has changed
 * since the profile was fitted (common practice for a drift warning, no single published source; a
 * ΔE00 of about 1 is a just-noticeable difference).
 */
export const DRIFT_LIMIT_DE00 = 5;

export type ProfileForPipeline = {
  id: string;
  name: string;
  /** Older profiles: a correction in linear sRGB. Ignored when `calibration` is given. */
  correction: Correction;
  /** The engine calibration (tone curves + correction to XYZ) of profiles fitted since 0005. */
  calibration?: Calibration | null;
  validFrom: Date;
  validUntil: Date | null;
  looMeanDeltaE00?: number | null;
};
/** A reference of known Lab, given under its own white point (D65 when not said). */
export type ReferenceInput = { region: RegionSpec; lab: Lab; label?: string; whitePoint?: "D65" | "D50" };

export type VialColour = {
  region: RegionSpec;
  rawLinearRgb: LinearRgb;
  xyz: Xyz;
  lab: Lab;
  lch: Lch;
  hex: string;
  pixels: number;
  rejected: number;
  spread: number;
  flags: string[];
  /** Standard uncertainties of L*, a*, b* and the combined ± ΔE00 (lib/color/uncertainty.ts). */
  uncertainty: VialUncertainty;
};

/** u(L*), u(a*), u(b*) and the combined ± ΔE00; `calibrationIncluded` is false without a profile (its systematic error is then unknown). */
export type VialUncertainty = { uL: number; uA: number; uB: number; uDeltaE00: number; calibrationIncluded: boolean };

export type ReferenceResult = {
  region: RegionSpec;
  lab: Lab;
  label?: string;
  rawLinearRgb: LinearRgb;
  /** The reference as the lighting profile alone sees it, and its distance from the known Lab. */
  profileLab: Lab;
  driftDeltaE00: number;
  /** After the full correction (should be close to `lab`). */
  correctedLab: Lab;
  flags: string[];
};

export type PipelineResult = {
  correction: Correction;
  /** "calibration": the profile's engine calibration then this 3×3 XYZ adaptation (9 numbers, or none). */
  stored: { kind: Correction["kind"] | "calibration"; values: number[] };
  references: ReferenceResult[];
  /** Per vial: the colour, or the reason it could not be measured. */
  vials: ({ ok: true; colour: VialColour } | { ok: false; error: string })[];
  photoFlags: PipelineFlag[];
};

/** Diagonal least-squares gains g_c minimising Σ (g_c·m_c − t_c)² over the references. */
function scalingGains(pairs: { measured: LinearRgb; target: LinearRgb }[]): Vec3 {
  return [0, 1, 2].map((c) => {
    const num = pairs.reduce((s, p) => s + p.measured[c] * p.target[c], 0);
    const den = pairs.reduce((s, p) => s + p.measured[c] * p.measured[c], 0);
    return num / den;
  }) as Vec3;
}

/** The profile's correction followed by diagonal gains, as one correction of the same family. */
export function scaleCorrection(base: Correction, gains: Vec3): Correction {
  switch (base.kind) {
    case "none":
      return { kind: "white-scaling", gains };
    case "white-scaling":
      return { kind: "white-scaling", gains: [base.gains[0] * gains[0], base.gains[1] * gains[1], base.gains[2] * gains[2]] };
    case "matrix-3x3":
      return { kind: "matrix-3x3", matrix: base.matrix.map((row, i) => row.map((v) => v * gains[i]) as Vec3) as typeof base.matrix };
    case "root-polynomial":
      return { kind: "root-polynomial", terms: base.terms.map((row, i) => row.map((v) => v * gains[i])) };
  }
}

/** The photo's encoding as the uncertainty model counts correlated pixels (JPEG blocks). */
function encodingOf(photo: DecodedPhoto): PhotoEncoding {
  return photo.format;
}

/**
 * Standard uncertainty of a colour measured with an older `Correction` profile (or none): pixel and
 * reference noise propagated through the same chain, plus the profile's leave-one-out mean ΔE00
 * spread evenly over L*, a*, b* (÷ √3, an approximation; no per-axis figure is stored for such profiles).
 */
function legacyUncertainty(stats: RegionStats, correction: Correction, encoding: PhotoEncoding, looMean: number | null): VialUncertainty {
  const per = looMean === null ? null : looMean / Math.sqrt(3);
  const u = colourUncertainty({
    toLab: (camera) => linearSrgbToLab(applyCorrection(correction, camera), "D65"),
    region: { camera: stats.linearRgb, sd: stats.sd ?? [0, 0, 0], pixels: Math.max(1, stats.pixels - stats.rejected), encoding },
    calibrationLabRms: per === null ? null : [per, per, per],
  });
  return { uL: u.uLab[0], uA: u.uLab[1], uB: u.uLab[2], uDeltaE00: u.uDeltaE00, calibrationIncluded: u.calibrationIncluded };
}

export function runPipeline(
  photo: DecodedPhoto,
  input: { vials: RegionSpec[]; references: ReferenceInput[]; profile: ProfileForPipeline | null; takenAt?: Date | null },
): PipelineResult {
  const base: Correction = input.profile?.correction ?? { kind: "none" };
  const calibration = input.profile?.calibration ?? null;
  const encoding = encodingOf(photo);
  const photoFlags: PipelineFlag[] = [];
  if (input.profile && input.takenAt) {
    const t = input.takenAt.getTime();
    if (t < input.profile.validFrom.getTime() || (input.profile.validUntil && t > input.profile.validUntil.getTime())) photoFlags.push("profile-not-valid-then");
  }

  const refStats: { ref: ReferenceInput; stats: RegionStats }[] = input.references.map((raw, i) => {
    // Known values are read under their own white point: a D50 card is Bradford-adapted, never read as D65.
    const ref = raw.whitePoint === "D50" ? { ...raw, lab: labD50ToLabD65(raw.lab), whitePoint: "D65" as const } : raw;
    try {
      return { ref, stats: measureRegion(photo, ref.region) };
    } catch (error) {
      if (error instanceof ColorInputError) throw new ColorInputError(`Reference ${ref.label ?? i + 1}: ${error.message}`);
      throw error;
    }
  });
  // A white reference must be neutral (C*ab ≤ 3, common practice, no source) before every channel is scaled by it.
  for (const { ref } of refStats) {
    const chroma = Math.hypot(ref.lab[1], ref.lab[2]);
    if (chroma > NEUTRAL_MAX_CHROMA) {
      throw new ColorInputError(`Reference ${ref.label ? `“${ref.label}” ` : ""}is not neutral (C*ab ${chroma.toFixed(1)} > ${NEUTRAL_MAX_CHROMA}); mark a white or grey patch or a blank-solvent vial as the reference.`);
    }
  }
  if (refStats.length > 0 && !input.profile) photoFlags.push("white-card-only");
  if (refStats.length === 0 && !input.profile) photoFlags.push("uncorrected");

  if (calibration) return runCalibrated(photo, input.vials, refStats, calibration, photoFlags, encoding, base);

  let correction = base;
  if (refStats.length > 0) {
    const pairs = refStats.map(({ ref, stats }) => {
      const seen = applyCorrection(base, stats.linearRgb);
      // fitWhiteScaling checks that the reference is bright enough to scale by.
      fitWhiteScaling({ measured: seen, referenceLab: ref.lab }, "D65");
      return { measured: seen, target: labToLinearSrgb(ref.lab, "D65") };
    });
    correction = scaleCorrection(base, scalingGains(pairs));
  }

  const references: ReferenceResult[] = refStats.map(({ ref, stats }) => {
    const profileLab = linearSrgbToLab(applyCorrection(base, stats.linearRgb), "D65");
    const driftDeltaE00 = deltaE00(profileLab, ref.lab);
    return {
      region: ref.region,
      lab: ref.lab,
      label: ref.label,
      rawLinearRgb: stats.linearRgb,
      profileLab,
      driftDeltaE00,
      correctedLab: linearSrgbToLab(applyCorrection(correction, stats.linearRgb), "D65"),
      flags: [...stats.flags],
    };
  });
  if (input.profile && references.some((r) => r.driftDeltaE00 > DRIFT_LIMIT_DE00)) photoFlags.push("reference-drift");

  const looMean = input.profile ? (input.profile.looMeanDeltaE00 ?? null) : null;
  const vials = input.vials.map((region) => {
    try {
      const stats = measureRegion(photo, region);
      const c = colourOfRegion(stats, correction, "D65");
      const colour: VialColour = {
        region,
        rawLinearRgb: c.rawLinearRgb,
        xyz: c.xyz,
        lab: c.lab,
        lch: c.lch,
        hex: c.hex,
        pixels: stats.pixels,
        rejected: stats.rejected,
        spread: stats.spread,
        // "white-card-only" is shown with the photo, not as a vial flag (it needs no reason to keep).
        flags: [...new Set([...c.flags, ...photoFlags.filter((f) => f !== "white-card-only")])],
        uncertainty: legacyUncertainty(stats, correction, encoding, looMean),
      };
      return { ok: true as const, colour };
    } catch (error) {
      if (error instanceof ColorInputError) return { ok: false as const, error: error.message };
      throw error;
    }
  });

  return { correction, stored: correctionToArray(correction), references, vials, photoFlags };
}

/**
 * With an engine calibration (tone curves + correction to XYZ): the first reference gives the day's
 * von Kries adaptation (lib/color/calibration.ts `whiteAdaptation`); every reference is also read
 * through the calibration alone for drift. Stored as kind "calibration" with the 3×3 adaptation
 * (empty without a reference): with the profile's calibration it re-derives each colour from raw RGB.
 */
function runCalibrated(
  photo: DecodedPhoto,
  vialRegions: RegionSpec[],
  refStats: { ref: ReferenceInput; stats: RegionStats }[],
  calibration: Calibration,
  photoFlags: PipelineFlag[],
  encoding: PhotoEncoding,
  base: Correction,
): PipelineResult {
  const day = refStats[0] ? { stats: refStats[0].stats, lab: refStats[0].ref.lab } : undefined;
  const adaptation = day ? whiteAdaptation(calibration, day.stats.linearRgb, day.lab, "D65", day.stats.flags) : undefined;
  const references: ReferenceResult[] = refStats.map(({ ref, stats }) => {
    const profileLab = applyCalibration(calibration, stats.linearRgb).labD65;
    return {
      region: ref.region,
      lab: ref.lab,
      label: ref.label,
      rawLinearRgb: stats.linearRgb,
      profileLab,
      driftDeltaE00: deltaE00(profileLab, ref.lab),
      correctedLab: applyCalibration(calibration, stats.linearRgb, adaptation).labD65,
      flags: [...stats.flags],
    };
  });
  if (references.some((r) => r.driftDeltaE00 > DRIFT_LIMIT_DE00)) photoFlags.push("reference-drift");
  const vials = vialRegions.map((region) => {
    try {
      const stats = measureRegion(photo, region);
      const c = measureCalibratedColour(stats, { calibration, white: "D65", reference: day, encoding });
      const colour: VialColour = {
        region,
        rawLinearRgb: stats.linearRgb,
        xyz: c.xyzD65,
        lab: c.lab,
        lch: c.lch,
        hex: c.hex,
        pixels: stats.pixels,
        rejected: stats.rejected,
        spread: stats.spread,
        flags: [...new Set([...c.flags, ...photoFlags.filter((f) => f !== "white-card-only")])],
        uncertainty: { uL: c.uncertainty.uLab[0], uA: c.uncertainty.uLab[1], uB: c.uncertainty.uLab[2], uDeltaE00: c.uncertainty.uDeltaE00, calibrationIncluded: c.uncertainty.calibrationIncluded },
      };
      return { ok: true as const, colour };
    } catch (error) {
      if (error instanceof ColorInputError) return { ok: false as const, error: error.message };
      throw error;
    }
  });
  return { correction: base, stored: { kind: "calibration", values: adaptation ? adaptation.flat() : [] }, references, vials, photoFlags };
}
