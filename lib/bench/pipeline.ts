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
import { colourUncertainty, type ColourUncertainty } from "../lighting/uncertainty";
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

export type ProfileForPipeline = { id: string; name: string; correction: Correction; validFrom: Date; validUntil: Date | null; looMeanDeltaE00?: number | null };
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
  /** Standard uncertainties of L*, a*, b* and the combined ± ΔE00 (lib/lighting/uncertainty.ts). */
  uncertainty: ColourUncertainty;
};

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
  stored: { kind: Correction["kind"]; values: number[] };
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

export function runPipeline(
  photo: DecodedPhoto,
  input: { vials: RegionSpec[]; references: ReferenceInput[]; profile: ProfileForPipeline | null; takenAt?: Date | null },
): PipelineResult {
  const base: Correction = input.profile?.correction ?? { kind: "none" };
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

  let correction = base;
  if (refStats.length > 0) {
    const pairs = refStats.map(({ ref, stats }) => {
      const seen = applyCorrection(base, stats.linearRgb);
      // A white reference must be neutral (C*ab ≤ 3, common practice, no source) and bright enough
      // (fitWhiteScaling checks the brightness) before every channel is scaled by it.
      const chroma = Math.hypot(ref.lab[1], ref.lab[2]);
      if (chroma > NEUTRAL_MAX_CHROMA) {
        throw new ColorInputError(`Reference ${ref.label ?? ""} is not neutral (C*ab ${chroma.toFixed(1)} > ${NEUTRAL_MAX_CHROMA}); mark a white or grey patch or a blank-solvent vial as the reference.`.replace("  ", " "));
      }
      fitWhiteScaling({ measured: seen, referenceLab: ref.lab }, "D65");
      return { measured: seen, target: labToLinearSrgb(ref.lab, "D65") };
    });
    correction = scaleCorrection(base, scalingGains(pairs));
    if (!input.profile) photoFlags.push("white-card-only");
  } else if (!input.profile) {
    photoFlags.push("uncorrected");
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
        uncertainty: colourUncertainty({
          lab: c.lab,
          spread: stats.spread,
          pixels: stats.pixels - stats.rejected,
          references: refStats.map((r) => ({ spread: r.stats.spread, pixels: r.stats.pixels - r.stats.rejected })),
          profileLooDeltaE00: input.profile ? (input.profile.looMeanDeltaE00 ?? null) : null,
        }),
      };
      return { ok: true as const, colour };
    } catch (error) {
      if (error instanceof ColorInputError) return { ok: false as const, error: error.message };
      throw error;
    }
  });

  return { correction, stored: correctionToArray(correction), references, vials, photoFlags };
}
