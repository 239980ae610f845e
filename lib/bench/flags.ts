/**
 * The words for each quality flag a measurement can carry, in one place for the bench, the review
 * queue and the measurement table. `short` fits a table cell; `long` says what the flag means.
 * Codes stay as they are in storage, exports and the API; people read these words.
 */
import type { CorrectionFlag } from "../color/calibrated-measure";
import type { RegionFlag } from "../color/regions";
import type { PipelineFlag } from "./pipeline";
import type { LIGHTNESS_FLAG, REPLICATE_FLAG } from "./replicates";

/** Every code a measurement can carry; the type makes a new code without words a compile error. */
export type FlagCode = RegionFlag | CorrectionFlag | PipelineFlag | typeof REPLICATE_FLAG | typeof LIGHTNESS_FLAG;

export const FLAG_WORDS: Record<FlagCode, { short: string; long: string }> = {
  "too-few-pixels": { short: "few pixels", long: "too few pixels" },
  "much-rejected": { short: "pixels rejected", long: "many pixels rejected (glare, label or edge)" },
  "non-uniform": { short: "not uniform", long: "not one colour (meniscus, bubbles, gradient)" },
  "near-clipping": { short: "near limit", long: "near the camera's limit" },
  "out-of-srgb-gamut": { short: "outside sRGB", long: "outside sRGB (screen colour approximate)" },
  uncorrected: { short: "uncorrected", long: "no light correction (no profile, no reference)" },
  "white-reference-only": { short: "white card only", long: "corrected by a white card only, with no lighting profile" },
  "white-card-only": { short: "white card only", long: "corrected by a white card only, with no lighting profile" },
  "reference-drift": { short: "light drift", long: "the light differs from the profile" },
  "profile-not-valid-then": { short: "profile date", long: "profile not valid on the photo's date" },
  "disagrees-with-replicates": { short: "≠ replicates", long: "far from the earlier accepted colours of this dye and condition" },
  "lightness-above-100": { short: "L* > 100", long: "L* above 100: lighter than the reference white" },
};

/** Words for a flag code; an unknown code is shown with its hyphens as spaces rather than hidden. */
export function flagWords(code: string): { short: string; long: string } {
  const known = (FLAG_WORDS as Record<string, { short: string; long: string } | undefined>)[code];
  if (known) return known;
  const plain = code.replace(/-/g, " ");
  return { short: plain, long: plain };
}
