import { WHITE_POINTS_2DEG } from "./illuminants";
import { labToXyz } from "./lab";
import { linearSrgbToHex, xyzD65ToLinearSrgb } from "./srgb";
import type { Lab } from "./types";

/** Screen colour of a CIELAB D65 value, clipped into sRGB. An approximation for swatches only. */
export function labD65ToHex(lab: Lab): string {
  return linearSrgbToHex(xyzD65ToLinearSrgb(labToXyz(lab, WHITE_POINTS_2DEG.D65)));
}

/** Whether a CIELAB D65 colour can be shown exactly on an sRGB screen (tolerance 0.1 % of full scale). */
export function labD65InSrgbGamut(lab: Lab): boolean {
  return xyzD65ToLinearSrgb(labToXyz(lab, WHITE_POINTS_2DEG.D65)).every((c) => c >= -0.001 && c <= 1.001);
}
