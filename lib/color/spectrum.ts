import { CIE1931_2DEG_CMF, CIE_ILLUMINANT_A, CIE_ILLUMINANT_D50, CIE_ILLUMINANT_D65 } from "./data/cie-tables";
import type { WhitePointName } from "./illuminants";
import type { Xyz } from "./types";

const ILLUMINANT_SPD: Record<WhitePointName, readonly (readonly [number, number])[]> = {
  D65: CIE_ILLUMINANT_D65,
  D50: CIE_ILLUMINANT_D50,
  A: CIE_ILLUMINANT_A,
};

/** A sampled spectrum: ascending wavelengths (nm) and values. */
export type SampledSpectrum = { wavelengths: number[]; values: number[] };

/** Linear interpolation, holding the end values outside the sampled range (CIE 015:2018 §7.2.2 practice). */
export function interpolateAt(spectrum: SampledSpectrum, nm: number): number {
  const { wavelengths: w, values: v } = spectrum;
  if (nm <= w[0]) return v[0];
  if (nm >= w[w.length - 1]) return v[v.length - 1];
  let lo = 0;
  let hi = w.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (w[mid] <= nm) lo = mid;
    else hi = mid;
  }
  const t = (nm - w[lo]) / (w[hi] - w[lo]);
  return v[lo] + t * (v[hi] - v[lo]);
}

/**
 * Tristimulus values of a transmitting (or reflecting) sample under a CIE illuminant, CIE 1931 2°
 * observer, by the CIE 015:2018 summation at 1 nm over 360–830 nm:
 * X = k Σ S(λ) T(λ) x̄(λ), k = 100 / Σ S(λ) ȳ(λ), so a perfect transmitter has Y = 100.
 * `transmittanceAt` gives T(λ) in 0–1 at each integer wavelength.
 */
export function transmittanceToXyz(transmittanceAt: (nm: number) => number, illuminant: WhitePointName): Xyz {
  const spd = ILLUMINANT_SPD[illuminant];
  const spdStart = spd[0][0];
  let x = 0;
  let y = 0;
  let z = 0;
  let norm = 0;
  for (const [nm, xb, yb, zb] of CIE1931_2DEG_CMF) {
    const s = spd[nm - spdStart][1];
    const t = transmittanceAt(nm);
    x += s * t * xb;
    y += s * t * yb;
    z += s * t * zb;
    norm += s * yb;
  }
  const k = 100 / norm;
  return [k * x, k * y, k * z];
}

/** XYZ of a decadic absorbance spectrum, T = 10^(−A·scale) (Beer–Lambert scaling by `scale`). */
export function absorbanceToXyz(absorbance: SampledSpectrum, illuminant: WhitePointName, scale = 1): Xyz {
  return transmittanceToXyz((nm) => Math.pow(10, -scale * interpolateAt(absorbance, nm)), illuminant);
}
