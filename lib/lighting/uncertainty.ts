/**
 * Standard uncertainty of a measured colour, after JCGM 100:2008 (GUM) practice: independent
 * components added in quadrature, then carried to ΔE00 by the law of propagation with sensitivity
 * coefficients taken by finite differences of CIEDE2000 (Sharma, Wu & Dalal 2005) at the colour.
 *
 * Components (each as a standard uncertainty per L*, a*, b*):
 * - pixel noise: the region's robust scatter divided by √(effective pixel count); JPEG pixels are
 *   correlated, so N_eff = N / 64 (one 8×8 JPEG block counted as one independent sample; common
 *   practice, no source);
 * - the in-photo reference's own pixel noise, the same way (it scales every channel);
 * - the lighting profile's leave-one-out residual (how far the fit misses a colour it has not seen);
 *   with no profile (white card only) 3 ΔE00 is used, the practitioner estimate for a phone photo
 *   corrected by a white card alone (no source).
 * ΔE-type figures are spread evenly over the three axes (÷ √3), an approximation.
 * Pure.
 */
import { deltaE00 } from "../color/difference";
import type { Lab } from "../color/types";

/** Pixels of a JPEG counted as one independent sample (8 × 8 block; common practice, no source). */
export const PIXELS_PER_INDEPENDENT_SAMPLE = 64;
/** Residual assumed for a photo corrected by a white card only, ΔE00 (practitioner estimate, no source). */
export const WHITE_ONLY_RESIDUAL_DE00 = 3;

export type ColourUncertainty = { uL: number; uA: number; uB: number; uDeltaE00: number };

const perAxis = (deltaE: number) => deltaE / Math.sqrt(3);

function pixelTerm(spread: number, pixels: number): number {
  const nEff = Math.max(1, pixels / PIXELS_PER_INDEPENDENT_SAMPLE);
  return perAxis(spread / Math.sqrt(nEff));
}

export function colourUncertainty(input: {
  lab: Lab;
  spread: number;
  pixels: number;
  references: { spread: number; pixels: number }[];
  /** The profile's leave-one-out mean ΔE00; null when there is no profile (white card only or uncorrected). */
  profileLooDeltaE00: number | null;
}): ColourUncertainty {
  const pix = pixelTerm(input.spread, input.pixels);
  const ref = input.references.length ? Math.sqrt(input.references.reduce((s, r) => s + pixelTerm(r.spread, r.pixels) ** 2, 0) / input.references.length) : 0;
  const fit = perAxis(input.profileLooDeltaE00 ?? WHITE_ONLY_RESIDUAL_DE00);
  const u = Math.sqrt(pix * pix + ref * ref + fit * fit);
  const [uL, uA, uB] = [u, u, u];
  // Sensitivity of ΔE00 to each axis at this colour (finite difference), combined in quadrature.
  const lab = input.lab;
  const dL = deltaE00(lab, [lab[0] + uL, lab[1], lab[2]]);
  const dA = deltaE00(lab, [lab[0], lab[1] + uA, lab[2]]);
  const dB = deltaE00(lab, [lab[0], lab[1], lab[2] + uB]);
  return { uL, uA, uB, uDeltaE00: Math.sqrt(dL * dL + dA * dA + dB * dB) };
}

/**
 * Whether two search results' distances to the target differ by less than their combined standard
 * uncertainty (√(u₁² + u₂²)): then their order is not meaningful and they are shown as a tie.
 */
export function isTie(a: { deltaE00: number; u: number | null }, b: { deltaE00: number; u: number | null }): boolean {
  if (a.u === null || b.u === null) return false;
  return Math.abs(a.deltaE00 - b.deltaE00) < Math.hypot(a.u, b.u);
}
