import { mat3Inverse } from "./matrix";
import type { LinearRgb, Vec3, Xyz } from "./types";

/**
 * sRGB, IEC 61966-2-1:1999. Transfer-function constants 0.0031308, 12.92, 1.055, 0.055, 2.4
 * (decode threshold 0.04045 = 12.92 × 0.0031308, rounded). Matrices for D65, Y of white = 1,
 * from the primaries x,y R 0.64/0.33, G 0.30/0.60, B 0.15/0.06 and white 0.3127/0.3290.
 */
export const SRGB_TO_XYZ_D65: readonly Vec3[] = [
  [0.4124564, 0.3575761, 0.1804375],
  [0.2126729, 0.7151522, 0.072175],
  [0.0193339, 0.119192, 0.9503041],
];

/** The exact inverse of SRGB_TO_XYZ_D65 (≈ 3.2404542, −1.5371385, −0.4985314 / …), so round trips are lossless. */
export const XYZ_D65_TO_SRGB: readonly Vec3[] = mat3Inverse(SRGB_TO_XYZ_D65);

/** Encoded sRGB value (0–1) → linear light (0–1). */
export function srgbDecode(v: number): number {
  return v <= 0.04045 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4);
}

/** Linear light (0–1) → encoded sRGB value (0–1). */
export function srgbEncode(v: number): number {
  return v <= 0.0031308 ? 12.92 * v : 1.055 * Math.pow(v, 1 / 2.4) - 0.055;
}

export function mat3MulVec(m: readonly Vec3[], v: Vec3): Vec3 {
  return [
    m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
    m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
    m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
  ];
}

/** Linear sRGB (white = 1,1,1) → XYZ D65 with Y of white = 100. */
export function linearSrgbToXyzD65(rgb: LinearRgb): Xyz {
  const [x, y, z] = mat3MulVec(SRGB_TO_XYZ_D65, rgb);
  return [x * 100, y * 100, z * 100];
}

/** XYZ D65 (Y of white = 100) → linear sRGB; may leave 0–1 for out-of-gamut colours. */
export function xyzD65ToLinearSrgb(xyz: Xyz): LinearRgb {
  return mat3MulVec(XYZ_D65_TO_SRGB, [xyz[0] / 100, xyz[1] / 100, xyz[2] / 100]);
}

/** Display hex of linear sRGB, clipped into gamut (for swatches only, never for numbers). */
export function linearSrgbToHex(rgb: LinearRgb): string {
  return (
    "#" +
    rgb
      .map((c) => Math.round(Math.min(1, Math.max(0, srgbEncode(Math.min(1, Math.max(0, c))))) * 255))
      .map((n) => n.toString(16).padStart(2, "0"))
      .join("")
  );
}
