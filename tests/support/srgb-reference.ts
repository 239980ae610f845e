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

/** The inverse of labOfLinear (CIE 015:2018 §8.2.1 inverted; the sRGB matrix inverted by Cramer's rule): CIELAB → linear sRGB. */
export function linearOfLab(lab: readonly number[]): [number, number, number] {
  const white = M.map((row) => row[0] + row[1] + row[2]);
  const fy = (lab[0] + 16) / 116;
  const fx = fy + lab[1] / 500;
  const fz = fy - lab[2] / 200;
  const finv = (t: number) => (t > 6 / 29 ? t ** 3 : 3 * (6 / 29) ** 2 * (t - 4 / 29));
  const xyz = [fx, fy, fz].map((t, i) => finv(t) * white[i]);
  const det = (m: number[][]) => m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
  const d = det(M);
  return [0, 1, 2].map((c) => det(M.map((row, i) => row.map((v, j) => (j === c ? xyz[i] : v)))) / d) as [number, number, number];
}
