/**
 * Solvent polarity scales and the medium classification used across Solvatlas.
 */

/** ET(30) of tetramethylsilane and water that define the normalised scale (Reichardt 1994). */
const ET30_TMS = 30.7;
const ET30_WATER_MINUS_TMS = 32.4;

/**
 * Normalised ET(30) polarity: ETN = (ET(30) − 30.7) / 32.4.
 * Source: C. Reichardt, "Solvatochromic dyes as solvent polarity indicators", Chem. Rev. 94 (1994)
 * 2319–2358. Input ET(30) in kcal/mol; TMS gives 0, water (63.1) gives 1.
 */
export function etnFromEt30(et30KcalMol: number): number {
  if (!Number.isFinite(et30KcalMol)) throw new RangeError("ET(30) must be a finite number in kcal/mol");
  return (et30KcalMol - ET30_TMS) / ET30_WATER_MINUS_TMS;
}

/**
 * Molar transition energy of a band at λmax: ET = h·c·ν̃·NA = 28591 / λmax(nm) kcal/mol
 * (Reichardt's definition of ET(30) applied to any band).
 */
export function transitionEnergyKcalMol(lambdaMaxNm: number): number {
  if (!(lambdaMaxNm > 0)) throw new RangeError("λmax must be a positive wavelength in nm");
  return 28591 / lambdaMaxNm;
}

export type MediumClass = "protic" | "dipolar-aprotic" | "nonpolar";

/** Relative permittivity that separates dipolar aprotic from nonpolar solvents (common practice, no source). */
export const DIPOLAR_PERMITTIVITY_THRESHOLD = 5;

/**
 * The usual classification: H-bond donors (O–H, N–H) are protic; the rest are dipolar aprotic when
 * εr ≥ 5 and nonpolar below. Common practice, no single published source.
 */
export function classifyMedium(input: { hBondDonor: boolean; permittivity: number | null }): MediumClass {
  if (input.hBondDonor) return "protic";
  if (input.permittivity === null) throw new RangeError("An aprotic solvent needs its permittivity to be classed");
  return input.permittivity >= DIPOLAR_PERMITTIVITY_THRESHOLD ? "dipolar-aprotic" : "nonpolar";
}

export const MEDIUM_LABELS: Record<MediumClass, string> = {
  protic: "protic",
  "dipolar-aprotic": "dipolar aprotic",
  nonpolar: "non-polar",
};
