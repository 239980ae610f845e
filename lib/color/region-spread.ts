import { linearSrgbToLab } from "./convert";
import { deltaE76 } from "./difference";
import { srgbDecode, srgbEncode } from "./srgb";
import type { LinearRgb } from "./types";

/**
 * Colour scatter of a region in ΔE*ab (CIELAB D65): each channel of the mean is moved by its robust
 * standard deviation (given in code values of a `max`-code scale) in encoded space, and the three
 * resulting ΔE*ab steps are combined as a root sum of squares.
 */
export function regionSpreadDeltaE(mean: LinearRgb, sdCodes: readonly number[], max: number): number {
  const base = linearSrgbToLab(mean, "D65");
  let total = 0;
  for (let c = 0; c < 3; c++) {
    if (sdCodes[c] === 0) continue;
    const moved: LinearRgb = [mean[0], mean[1], mean[2]];
    const e = srgbEncode(mean[c]);
    // Step towards the middle of the range so a value near an end does not leave 0–1.
    const step = (sdCodes[c] / max) * (e > 0.5 ? -1 : 1);
    moved[c] = srgbDecode(Math.min(1, Math.max(0, e + step)));
    const d = deltaE76(base, linearSrgbToLab(moved, "D65"));
    total += d * d;
  }
  return Math.sqrt(total);
}
