import { filterDeficiencyDeuter, filterDeficiencyProt, filterDeficiencyTrit } from "culori";
import { WHITE_POINTS_2DEG } from "./illuminants";
import { labToXyz, xyzToLab } from "./lab";
import { linearSrgbToXyzD65, srgbDecode, srgbEncode, xyzD65ToLinearSrgb } from "./srgb";
import { deltaE00 } from "./difference";
import type { Lab } from "./types";

/** Dichromat viewers: missing L cones (protan), M cones (deutan) or S cones (tritan). */
export type ViewerKind = "protan" | "deutan" | "tritan";

/**
 * Machado, Oliveira & Fernandes (2009), "A physiologically-based model for simulation of color
 * vision deficiency", IEEE TVCG 15(6) 1291–1298, severity 1 (dichromacy), as implemented by culori.
 * culori applies the matrices to sRGB-encoded values; we do the same so results match culori.
 */
const FILTERS: Record<ViewerKind, ReturnType<typeof filterDeficiencyProt>> = {
  protan: filterDeficiencyProt(1),
  deutan: filterDeficiencyDeuter(1),
  tritan: filterDeficiencyTrit(1),
};

const signedEncode = (v: number) => Math.sign(v) * srgbEncode(Math.abs(v));
const signedDecode = (v: number) => Math.sign(v) * srgbDecode(Math.abs(v));

/** The colour (CIELAB D65) that a dichromat of `kind` sees in place of `lab` (CIELAB D65). */
export function simulateViewerLab(lab: Lab, kind: ViewerKind): Lab {
  const lin = xyzD65ToLinearSrgb(labToXyz(lab, WHITE_POINTS_2DEG.D65));
  const seen = FILTERS[kind]({ mode: "rgb", r: signedEncode(lin[0]), g: signedEncode(lin[1]), b: signedEncode(lin[2]) });
  const back = linearSrgbToXyzD65([signedDecode(seen.r), signedDecode(seen.g), signedDecode(seen.b)]);
  return xyzToLab(back, WHITE_POINTS_2DEG.D65);
}

/** ΔE00 between two CIELAB D65 colours as a dichromat of `kind` would see them. */
export function deltaE00ForViewer(x: Lab, y: Lab, kind: ViewerKind): number {
  return deltaE00(simulateViewerLab(x, kind), simulateViewerLab(y, kind));
}
