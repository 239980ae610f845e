import { WHITE_POINTS_2DEG } from "./illuminants";
import { labToXyz, xyzToLab } from "./lab";
import type { Mat3 } from "./matrix";
import { linearSrgbToXyzD65, mat3MulVec, xyzD65ToLinearSrgb } from "./srgb";
import { deltaE00 } from "./difference";
import type { Lab } from "./types";

/** Dichromat viewers: missing L cones (protan), M cones (deutan) or S cones (tritan). */
export type ViewerKind = "protan" | "deutan" | "tritan";

/**
 * G. M. Machado, M. M. Oliveira & L. A. F. Fernandes (2009), "A physiologically-based model for
 * simulation of color vision deficiency", IEEE TVCG 15(6) 1291–1298: the precomputed matrices for
 * severity 1.0 (protanopia, deuteranopia, tritanopia) published with the paper. They act on LINEAR
 * RGB (the paper derives them from the cone fundamentals and the display primaries' spectra, in
 * linear light); applying them to gamma-encoded values, as some libraries do, gives a different
 * colour and can flip a pass/fail on a pair of indicator colours.
 */
export const MACHADO_2009_SEVERITY_1: Record<ViewerKind, Mat3> = {
  protan: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deutan: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritan: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
};

/** The colour (CIELAB D65) that a dichromat of `kind` sees in place of `lab` (CIELAB D65), simulated in linear sRGB. */
export function simulateViewerLab(lab: Lab, kind: ViewerKind): Lab {
  const lin = xyzD65ToLinearSrgb(labToXyz(lab, WHITE_POINTS_2DEG.D65));
  const seen = mat3MulVec(MACHADO_2009_SEVERITY_1[kind], lin);
  return xyzToLab(linearSrgbToXyzD65(seen), WHITE_POINTS_2DEG.D65);
}

/** ΔE00 between two CIELAB D65 colours as a dichromat of `kind` would see them. */
export function deltaE00ForViewer(x: Lab, y: Lab, kind: ViewerKind): number {
  return deltaE00(simulateViewerLab(x, kind), simulateViewerLab(y, kind));
}
