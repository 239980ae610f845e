/**
 * Colours measured with an instrument (spectrophotometer, colorimeter) brought to the form every colour
 * row keeps: CIELAB relative to D65 with the CIE 1931 2° observer, XYZ (Y of the white = 100) and the
 * linear sRGB equivalent in place of a camera's raw RGB.
 *
 * A D50 colour is adapted to D65 with the linear Bradford transform (Lam 1985; as tabulated by
 * Lindbloom, "Chromatic Adaptation"), the same adaptation lib/color/convert.ts uses elsewhere. Colours
 * for the 10° observer are refused: an observer change needs the spectrum, not the tristimulus values.
 */
import { labD50ToLabD65 } from "../color/convert";
import { WHITE_POINTS_2DEG } from "../color/illuminants";
import { labToXyz } from "../color/lab";
import { xyzD65ToLinearSrgb } from "../color/srgb";
import type { Lab, LinearRgb, Xyz } from "../color/types";

export type InstrumentWhite = "D65" | "D50";

export function instrumentColourToD65(lab: Lab, white: InstrumentWhite): { lab: Lab; xyz: Xyz; linearRgb: LinearRgb } {
  const lab65 = white === "D65" ? lab : labD50ToLabD65(lab);
  const xyz = labToXyz(lab65, WHITE_POINTS_2DEG.D65);
  return { lab: lab65, xyz, linearRgb: xyzD65ToLinearSrgb(xyz) };
}
