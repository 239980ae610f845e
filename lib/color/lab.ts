import type { Lab, Lch, Xyz } from "./types";

/** CIE 1976 L*a*b* constants, CIE 015:2018 §8.2.1: ε = (6/29)³, κ = (29/3)³ form. */
const EPSILON = 216 / 24389;
const KAPPA = 24389 / 27;

function f(t: number): number {
  return t > EPSILON ? Math.cbrt(t) : (KAPPA * t + 16) / 116;
}

function fInv(t: number): number {
  const t3 = t * t * t;
  return t3 > EPSILON ? t3 : (116 * t - 16) / KAPPA;
}

/** XYZ (any scale) → CIELAB relative to `white` on the same scale (CIE 015:2018 eq. 8.1–8.3). */
export function xyzToLab(xyz: Xyz, white: Xyz): Lab {
  const fx = f(xyz[0] / white[0]);
  const fy = f(xyz[1] / white[1]);
  const fz = f(xyz[2] / white[2]);
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

export function labToXyz(lab: Lab, white: Xyz): Xyz {
  const fy = (lab[0] + 16) / 116;
  const fx = fy + lab[1] / 500;
  const fz = fy - lab[2] / 200;
  return [fInv(fx) * white[0], fInv(fy) * white[1], fInv(fz) * white[2]];
}

export function labToLch(lab: Lab): Lch {
  const c = Math.hypot(lab[1], lab[2]);
  let h = (Math.atan2(lab[2], lab[1]) * 180) / Math.PI;
  if (h < 0) h += 360;
  return [lab[0], c, c < 1e-9 ? 0 : h];
}

export function lchToLab(lch: Lch): Lab {
  const r = (lch[2] * Math.PI) / 180;
  return [lch[0], lch[1] * Math.cos(r), lch[1] * Math.sin(r)];
}
