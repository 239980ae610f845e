import { WHITE_POINTS_2DEG } from "./illuminants";
import type { WhitePointName } from "./illuminants";
import { labToLch, labToXyz, xyzToLab } from "./lab";
import { mat3Inverse, mat3Mul, type Mat3 } from "./matrix";
import { linearSrgbToHex, linearSrgbToXyzD65, mat3MulVec, xyzD65ToLinearSrgb } from "./srgb";
import type { Lab, Lch, LinearRgb, Vec3, Xyz } from "./types";

/** The reference whites a measurement can be expressed against. */
export type LabWhite = "D65" | "D50";

/**
 * Bradford cone-response matrix (Lam 1985; as used in ICC.1 Annex E and CIECAM97s).
 * Rows give the sharpened responses ρ, γ, β from XYZ.
 */
export const BRADFORD: readonly Vec3[] = [
  [0.8951, 0.2664, -0.1614],
  [-0.7502, 1.7135, 0.0367],
  [0.0389, -0.0685, 1.0296],
];

/**
 * Chromatic-adaptation matrix from `from` white to `to` white by the von Kries transform in the
 * Bradford cone space: M = B⁻¹ · diag(B·to / B·from) · B. Whites on any common scale.
 */
export function bradfordAdaptation(from: Xyz, to: Xyz): Mat3 {
  const s = mat3MulVec(BRADFORD, from);
  const d = mat3MulVec(BRADFORD, to);
  const scale: Mat3 = [
    [d[0] / s[0], 0, 0],
    [0, d[1] / s[1], 0],
    [0, 0, d[2] / s[2]],
  ];
  return mat3Mul(mat3Inverse(BRADFORD), mat3Mul(scale, BRADFORD));
}

/** CIE 015:2018 D65 → D50 white (Table 9.1 values), Bradford. */
export const XYZ_D65_TO_D50: Mat3 = bradfordAdaptation(WHITE_POINTS_2DEG.D65, WHITE_POINTS_2DEG.D50);
export const XYZ_D50_TO_D65: Mat3 = bradfordAdaptation(WHITE_POINTS_2DEG.D50, WHITE_POINTS_2DEG.D65);

export function xyzD65ToXyzD50(xyz: Xyz): Xyz {
  return mat3MulVec(XYZ_D65_TO_D50, xyz);
}

export function xyzD50ToXyzD65(xyz: Xyz): Xyz {
  return mat3MulVec(XYZ_D50_TO_D65, xyz);
}

/** Linear sRGB (white = 1,1,1) → XYZ relative to `white` (Y of white = 100); D50 by Bradford from D65. */
export function linearSrgbToXyz(rgb: LinearRgb, white: LabWhite): Xyz {
  const d65 = linearSrgbToXyzD65(rgb);
  return white === "D65" ? d65 : xyzD65ToXyzD50(d65);
}

/** XYZ relative to `white` → linear sRGB; out-of-gamut colours leave 0–1. */
export function xyzToLinearSrgb(xyz: Xyz, white: LabWhite): LinearRgb {
  return xyzD65ToLinearSrgb(white === "D65" ? xyz : xyzD50ToXyzD65(xyz));
}

/** Linear sRGB → CIELAB relative to the CIE 015 white of `white` (D50 via Bradford adaptation). */
export function linearSrgbToLab(rgb: LinearRgb, white: LabWhite): Lab {
  return xyzToLab(linearSrgbToXyz(rgb, white), WHITE_POINTS_2DEG[white]);
}

/** CIELAB relative to `white` → linear sRGB (may leave 0–1 for colours outside the sRGB gamut). */
export function labToLinearSrgb(lab: Lab, white: LabWhite): LinearRgb {
  return xyzToLinearSrgb(labToXyz(lab, WHITE_POINTS_2DEG[white]), white);
}

export function linearSrgbToLch(rgb: LinearRgb, white: LabWhite): Lch {
  return labToLch(linearSrgbToLab(rgb, white));
}

export function labD65ToLabD50(lab: Lab): Lab {
  return xyzToLab(xyzD65ToXyzD50(labToXyz(lab, WHITE_POINTS_2DEG.D65)), WHITE_POINTS_2DEG.D50);
}

export function labD50ToLabD65(lab: Lab): Lab {
  return xyzToLab(xyzD50ToXyzD65(labToXyz(lab, WHITE_POINTS_2DEG.D50)), WHITE_POINTS_2DEG.D65);
}

/** Display hex of a CIELAB colour relative to `white`, clipped into sRGB (for swatches only). */
export function labToHex(lab: Lab, white: LabWhite): string {
  return linearSrgbToHex(labToLinearSrgb(lab, white));
}

/** Whether linear sRGB lies inside the sRGB gamut, with a tolerance of 0.1 % of full scale. */
export function linearSrgbInGamut(rgb: LinearRgb, tolerance = 0.001): boolean {
  return rgb.every((c) => c >= -tolerance && c <= 1 + tolerance);
}

/**
 * XYZ under any CIE illuminant of `WHITE_POINTS_2DEG` → XYZ D65 by Bradford, for showing a colour
 * seen under that illuminant on a D65 screen. `whiteXyz` is the illuminant's white on the same scale.
 */
export function xyzToXyzD65(xyz: Xyz, whiteXyz: Xyz): Xyz {
  return mat3MulVec(bradfordAdaptation(whiteXyz, WHITE_POINTS_2DEG.D65), xyz);
}

export { linearSrgbToHex };
export type { WhitePointName };
