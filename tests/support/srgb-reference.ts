/**
 * sRGB (IEC 61966-2-1, parameters in tests/fixtures/srgb_iec61966_2_1_parameters.csv) to CIELAB
 * (CIE 015:2018 §8.2.1), written out independently of lib/color so tests can check the engine.
 * The white is the matrix's own (RGB 1,1,1), so sRGB white is exactly L* 100, a* 0, b* 0.
 */
import { readFixtureCsv } from "./fixtures";

const P = Object.fromEntries(readFixtureCsv("srgb_iec61966_2_1_parameters.csv").map((r) => [r.parameter, Number(r.value)]));
const M = [1, 2, 3].map((i) => [1, 2, 3].map((j) => P[`M_RGB_to_XYZ_${i}${j}`]));

export function srgbDecode8(v8: number): number {
  const v = v8 / 255;
  return v <= 0.04045 ? v / P.eotf_inverse_linear_slope : ((v + P.eotf_inverse_offset) / P.eotf_inverse_scale) ** P.eotf_exponent;
}

export function srgbEncode(v: number): number {
  return v <= P.eotf_inverse_linear_threshold ? P.eotf_inverse_linear_slope * v : P.eotf_inverse_scale * v ** (1 / P.eotf_exponent) - P.eotf_inverse_offset;
}

export function labOfLinear(rgb: number[]): [number, number, number] {
  const xyz = M.map((row) => row.reduce((s, m, j) => s + m * rgb[j], 0));
  const white = M.map((row) => row[0] + row[1] + row[2]);
  const f = (t: number) => (t > (6 / 29) ** 3 ? Math.cbrt(t) : t / (3 * (6 / 29) ** 2) + 4 / 29);
  const [fx, fy, fz] = xyz.map((v, i) => f(v / white[i]));
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

export const labOf8 = (c: readonly number[]) => labOfLinear(c.map(srgbDecode8));

/** Euclidean ΔE*ab (CIE 1976), enough for closeness checks. */
export const deltaE76 = (p: readonly number[], q: readonly number[]) => Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]);
