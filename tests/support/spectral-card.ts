/**
 * A calibration card and dye vials made from invented smooth spectra, with their colours computed
 * from the CIE tables in tests/fixtures (CIE 018:2019 Table 6 colour-matching functions, CIE D65, D50
 * and A illuminants; see tests/fixtures/SOURCES.md), independently of lib/color: the card's
 * reference values are therefore not produced by the code under test.
 *
 * The patches are not a published chart: reflectances are sigmoid steps, bumps and flat greys
 * chosen to spread over hue and lightness like a typical colour checker; the vials are transmittances
 * T = 10^(−A) of Gaussian absorption bands, like dissolved dyes.
 */
import { readFixtureCsv } from "./fixtures";

export type Spectrum = (nm: number) => number;
export type Illuminant = "D65" | "D50" | "A";
type V3 = [number, number, number];

const CMF = readFixtureCsv("cie1931_2deg_cmf_1nm.csv").map((r) => [Number(r.wavelength_nm), Number(r.x_bar), Number(r.y_bar), Number(r.z_bar)]);
const SPD: Record<Illuminant, Map<number, number>> = {
  D65: new Map(readFixtureCsv("cie_illuminant_D65_1nm.csv").map((r) => [Number(r.wavelength_nm), Number(r.S_D65)])),
  D50: new Map(readFixtureCsv("cie_illuminant_D50_1nm.csv").map((r) => [Number(r.wavelength_nm), Number(r.S_D50)])),
  A: new Map(readFixtureCsv("cie_illuminant_A_1nm.csv").map((r) => [Number(r.wavelength_nm), Number(r.S_A)])),
};

/** CIE 015:2018 §7: X = k Σ S R x̄ at 1 nm, k = 100 / Σ S ȳ (perfect reflector Y = 100). */
export function spectrumXyz(r: Spectrum, ill: Illuminant): V3 {
  const s = SPD[ill];
  let x = 0;
  let y = 0;
  let z = 0;
  let n = 0;
  for (const [nm, xb, yb, zb] of CMF) {
    const e = s.get(nm) ?? 0;
    const v = r(nm);
    x += e * v * xb;
    y += e * v * yb;
    z += e * v * zb;
    n += e * yb;
  }
  return [(100 * x) / n, (100 * y) / n, (100 * z) / n];
}

export const whiteXyz = (ill: Illuminant): V3 => spectrumXyz(() => 1, ill);

/** CIE 015:2018 §8.2.1 CIELAB. */
export function xyzToLabRef(xyz: V3, white: V3): V3 {
  const f = (t: number) => (t > (6 / 29) ** 3 ? Math.cbrt(t) : t / (3 * (6 / 29) ** 2) + 4 / 29);
  const [fx, fy, fz] = xyz.map((v, i) => f(v / white[i]));
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

export const spectrumLab = (r: Spectrum, ill: Illuminant): V3 => xyzToLabRef(spectrumXyz(r, ill), whiteXyz(ill));

/**
 * XYZ relative to D65 as a camera sees the object lit by `light`: the illuminant's own white is
 * brought to D65 by the cone-space von Kries (Bradford) matrix, as a camera's white balance would,
 * so a D65-lit scene is unchanged and a warm (A) light leaves only its metameric differences.
 */
export function sceneXyzD65(r: Spectrum, light: Illuminant): V3 {
  const xyz = spectrumXyz(r, light);
  if (light === "D65") return xyz;
  const B = [
    [0.8951, 0.2664, -0.1614],
    [-0.7502, 1.7135, 0.0367],
    [0.0389, -0.0685, 1.0296],
  ];
  const mul = (m: number[][], v: number[]) => m.map((row) => row[0] * v[0] + row[1] * v[1] + row[2] * v[2]);
  const s = mul(B, whiteXyz(light));
  const d = mul(B, whiteXyz("D65"));
  const cone = mul(B, xyz).map((v, i) => (v * d[i]) / s[i]);
  // Inverse of B by Cramer's rule.
  const [a, b, c] = B;
  const det = a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0]) + a[2] * (b[0] * c[1] - b[1] * c[0]);
  const inv = [
    [(b[1] * c[2] - b[2] * c[1]) / det, (a[2] * c[1] - a[1] * c[2]) / det, (a[1] * b[2] - a[2] * b[1]) / det],
    [(b[2] * c[0] - b[0] * c[2]) / det, (a[0] * c[2] - a[2] * c[0]) / det, (a[2] * b[0] - a[0] * b[2]) / det],
    [(b[0] * c[1] - b[1] * c[0]) / det, (a[1] * c[0] - a[0] * c[1]) / det, (a[0] * b[1] - a[1] * b[0]) / det],
  ];
  return mul(inv, cone) as V3;
}

const sigmoid = (nm: number, centre: number, width: number) => 1 / (1 + Math.exp(-(nm - centre) / width));
const bump = (nm: number, centre: number, width: number) => Math.exp(-0.5 * ((nm - centre) / width) ** 2);

export type CardPatch = { name: string; reflectance: Spectrum };

/** Six flat greys, from white to black. */
export const GREYS: CardPatch[] = [0.88, 0.58, 0.36, 0.19, 0.09, 0.035].map((v, i) => ({ name: `grey ${i + 1}`, reflectance: () => v }));

/** Eighteen smooth chromatic reflectances spread over hue and lightness (invented). */
export const CHROMATIC: CardPatch[] = [
  { name: "red", reflectance: (nm) => 0.05 + 0.55 * sigmoid(nm, 600, 12) },
  { name: "orange", reflectance: (nm) => 0.05 + 0.7 * sigmoid(nm, 575, 14) },
  { name: "yellow", reflectance: (nm) => 0.06 + 0.78 * sigmoid(nm, 510, 12) },
  { name: "yellow-green", reflectance: (nm) => 0.05 + 0.5 * sigmoid(nm, 490, 12) * (1 - 0.7 * sigmoid(nm, 600, 15)) },
  { name: "green", reflectance: (nm) => 0.05 + 0.35 * bump(nm, 530, 35) },
  { name: "blue-green", reflectance: (nm) => 0.05 + 0.4 * bump(nm, 495, 40) },
  { name: "cyan", reflectance: (nm) => 0.07 + 0.55 * (1 - sigmoid(nm, 560, 15)) * sigmoid(nm, 420, 10) },
  { name: "blue", reflectance: (nm) => 0.05 + 0.4 * (1 - sigmoid(nm, 500, 12)) },
  { name: "violet", reflectance: (nm) => 0.06 + 0.3 * (1 - sigmoid(nm, 480, 14)) + 0.25 * sigmoid(nm, 640, 15) },
  { name: "magenta", reflectance: (nm) => 0.06 + 0.5 * (1 - sigmoid(nm, 480, 14)) + 0.55 * sigmoid(nm, 600, 14) },
  { name: "pink", reflectance: (nm) => 0.3 + 0.45 * sigmoid(nm, 590, 15) },
  { name: "skin", reflectance: (nm) => 0.15 + 0.35 * sigmoid(nm, 570, 25) },
  { name: "brown", reflectance: (nm) => 0.04 + 0.18 * sigmoid(nm, 585, 25) },
  { name: "olive", reflectance: (nm) => 0.04 + 0.14 * bump(nm, 560, 50) },
  { name: "navy", reflectance: (nm) => 0.03 + 0.12 * (1 - sigmoid(nm, 490, 15)) },
  { name: "sky", reflectance: (nm) => 0.2 + 0.25 * (1 - sigmoid(nm, 530, 30)) },
  { name: "lime", reflectance: (nm) => 0.06 + 0.6 * bump(nm, 550, 45) },
  { name: "purple", reflectance: (nm) => 0.05 + 0.2 * (1 - sigmoid(nm, 470, 12)) + 0.2 * sigmoid(nm, 620, 15) },
];

export const CARD: CardPatch[] = [...CHROMATIC, ...GREYS];

/** Dye-like vials: T = 10^(−Σ A_k exp(−½((λ − λ_k)/w_k)²)), invented bands. */
export const VIALS: { name: string; transmittance: Spectrum }[] = [
  [430, 35, 0.9],
  [470, 40, 1.0],
  [510, 40, 0.8],
  [540, 35, 1.2],
  [575, 40, 0.7],
  [600, 45, 1.0],
  [630, 40, 0.9],
  [660, 35, 0.6],
  [520, 50, 0.35],
  [590, 30, 0.4],
].map(([peak, width, a], i) => ({ name: `vial ${i + 1} (λmax ${peak} nm)`, transmittance: (nm: number) => Math.pow(10, -a * bump(nm, peak, width)) }));
