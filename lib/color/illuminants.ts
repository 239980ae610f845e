import type { Xyz } from "./types";

export type WhitePointName = "D65" | "D50" | "A";

/**
 * Tristimulus values of the CIE illuminants for the CIE 1931 2° observer, Y = 100.
 * Source: CIE 015:2018 Colorimetry, 4th ed., Table 9.1 (D65 95.047/100/108.883,
 * D50 96.422/100/82.521, A 109.850/100/35.585).
 */
export const WHITE_POINTS_2DEG: Record<WhitePointName, Xyz> = {
  D65: [95.047, 100, 108.883],
  D50: [96.422, 100, 82.521],
  A: [109.85, 100, 35.585],
};
