import { applyCorrection, type Correction } from "./correction";
import { linearSrgbInGamut, linearSrgbToHex, linearSrgbToLab, linearSrgbToXyz, type LabWhite } from "./convert";
import { labToLch } from "./lab";
import type { RegionFlag, RegionStats } from "./regions";
import type { Lab, Lch, LinearRgb, Xyz } from "./types";

/** A region's colour after light correction, with its white point named. */
export type RegionColour = {
  /** Raw robust mean of the region, before correction (keep it: corrections can be refitted). */
  rawLinearRgb: LinearRgb;
  /** Linear sRGB after correction (may leave 0–1). */
  linearRgb: LinearRgb;
  white: LabWhite;
  xyz: Xyz;
  lab: Lab;
  lch: Lch;
  /** Display swatch, clipped into sRGB. */
  hex: string;
  flags: RegionFlag[];
};

/** Applies `correction` to a measured region and expresses it as XYZ/CIELAB/LCh relative to `white`. */
export function colourOfRegion(stats: RegionStats, correction: Correction, white: LabWhite): RegionColour {
  const linearRgb = applyCorrection(correction, stats.linearRgb);
  const lab = linearSrgbToLab(linearRgb, white);
  const flags = [...stats.flags];
  if (!linearSrgbInGamut(linearRgb)) flags.push("out-of-srgb-gamut");
  return {
    rawLinearRgb: stats.linearRgb,
    linearRgb,
    white,
    xyz: linearSrgbToXyz(linearRgb, white),
    lab,
    lch: labToLch(lab),
    hex: linearSrgbToHex(linearRgb),
    flags,
  };
}
