import { ColorSpace, OKLab, XYZ_D65, to } from "colorjs.io/fn";
import { WHITE_POINTS_2DEG } from "./illuminants";
import { labToXyz } from "./lab";
import type { Lab, Vec3 } from "./types";

ColorSpace.register(XYZ_D65);
ColorSpace.register(OKLab);

/**
 * OKLab (B. Ottosson 2020, "A perceptual color space for image processing") of a CIELAB D65 colour,
 * computed by colorjs.io from CIE XYZ D65 (Y of the white = 1). L is 0–1 (white ≈ 1).
 */
export function labD65ToOklab(lab: Lab): Vec3 {
  const [x, y, z] = labToXyz(lab, WHITE_POINTS_2DEG.D65);
  const out = to({ space: XYZ_D65, coords: [x / 100, y / 100, z / 100], alpha: 1 }, OKLab);
  return [out.coords[0] ?? 0, out.coords[1] ?? 0, out.coords[2] ?? 0];
}

/**
 * ΔEOK: Euclidean distance in OKLab between two CIELAB D65 colours, scaled ×100 so that it reads on a
 * scale similar to ΔE00 for small differences (colorjs.io's deltaEOK is the same distance unscaled).
 *
 * Why: CIEDE2000 (Luo, Cui & Rigg 2001) was fitted to small colour differences; for large ones its hue
 * term is discontinuous where the two hues are 180° apart (the mean hue flips), so a yellow–blue pair
 * can change by several units across a fraction of a degree. A Euclidean distance in a uniform space
 * is continuous everywhere and ranks large shifts (acid vs base colour, one solvent vs another) sensibly.
 */
export function deltaEOK(x: Lab, y: Lab): number {
  const p = labD65ToOklab(x);
  const q = labD65ToOklab(y);
  return 100 * Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]);
}

/** How the UI names the metric used for ranking large differences. */
export const LARGE_DIFFERENCE_LABEL = "ΔEOK (OKLab distance ×100)";
