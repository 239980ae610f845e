import { differenceCie76, differenceCie94, differenceCiede2000 } from "culori";
import type { Lab } from "./types";

const de2000 = differenceCiede2000();
const de94 = differenceCie94();
const de76 = differenceCie76();

// culori's difference functions convert their inputs to lab65; passing lab65 objects avoids a detour.
const asLab65 = (lab: Lab) => ({ mode: "lab65" as const, l: lab[0], a: lab[1], b: lab[2] });

/**
 * CIEDE2000 colour difference, kL = kC = kH = 1. Source: CIE 142-2001; Sharma, Wu & Dalal,
 * "The CIEDE2000 color-difference formula: implementation notes…", Color Res. Appl. 30 (2005) 21–30.
 * Inputs: CIELAB relative to the same white (D65 in Solvatlas).
 */
export function deltaE00(x: Lab, y: Lab): number {
  return de2000(asLab65(x), asLab65(y));
}

/** CIE 1994 colour difference (graphic-arts weights kL = 1, K1 = 0.045, K2 = 0.015). */
export function deltaE94(x: Lab, y: Lab): number {
  return de94(asLab65(x), asLab65(y));
}

/** CIE 1976 ΔE*ab: Euclidean distance in CIELAB. */
export function deltaE76(x: Lab, y: Lab): number {
  return de76(asLab65(x), asLab65(y));
}
