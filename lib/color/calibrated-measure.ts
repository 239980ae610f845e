/**
 * One region's colour through a calibration (or none) and the day's white reference (or none), with
 * its uncertainty: the step the CLI's `measure` and the bench share. Pure.
 */
import { applyCalibration, checkWhiteReference, whiteAdaptation, type Calibration } from "./calibration";
import { applyCorrection, fitWhiteScaling } from "./correction";
import { linearSrgbInGamut, linearSrgbToHex, linearSrgbToLab, xyzToLinearSrgb, type LabWhite } from "./convert";
import { labToLch } from "./lab";
import { linearSrgbToXyzD65 } from "./srgb";
import type { RegionStats } from "./regions";
import type { Lab, Lch, LinearRgb, Xyz } from "./types";
import { colourUncertainty, type ColourUncertainty, type PhotoEncoding, type RegionSample } from "./uncertainty";

/** How the colour was corrected, as a flag shown with it. */
export type CorrectionFlag = "uncorrected" | "white-reference-only";

export type MeasuredColour = {
  lab: Lab;
  lch: Lch;
  white: LabWhite;
  xyzD65: Xyz;
  hex: string;
  uncertainty: ColourUncertainty;
  flags: string[];
};

export type DayReference = { stats: RegionStats; lab: Lab };

function sample(stats: RegionStats, encoding: PhotoEncoding, pixelsPerSample?: number): RegionSample {
  return { camera: stats.linearRgb, sd: stats.sd ?? [0, 0, 0], pixels: Math.max(1, stats.pixels - stats.rejected), encoding, pixelsPerSample: pixelsPerSample ?? stats.pixelsPerSample };
}

/**
 * The colour of `stats` relative to `white`. With a calibration: its tone curve and correction, then
 * (if given) a von Kries adaptation to the day's white reference (`whiteAdaptation`). Without one:
 * the camera is read as sRGB, scaled by the white reference if there is one (flag
 * "white-reference-only": no profile stands behind the colour) or left as it is ("uncorrected").
 */
export function measureCalibratedColour(
  stats: RegionStats,
  opts: {
    calibration: Calibration | null;
    white: LabWhite;
    reference?: DayReference;
    encoding: PhotoEncoding;
    /** Pixels per independent sample of the region and the reference; default: the stats' own (autocorrelation), else by encoding. */
    pixelsPerSample?: { region?: number; reference?: number };
  },
): MeasuredColour {
  const { calibration, white, reference } = opts;
  const flags: string[] = [...stats.flags];
  let toLab: (camera: LinearRgb, referenceCamera?: LinearRgb) => Lab;
  let toXyzD65: (camera: LinearRgb) => Xyz;
  if (calibration) {
    const adapt = (refCam?: LinearRgb) => (reference && refCam ? whiteAdaptation(calibration, refCam, reference.lab, white, reference.stats.flags) : undefined);
    const fixed = adapt(reference?.stats.linearRgb);
    toLab = (camera, refCam) => applyCalibration(calibration, camera, refCam ? adapt(refCam) : fixed).lab(white);
    toXyzD65 = (camera) => applyCalibration(calibration, camera, fixed).xyzD65;
  } else if (reference) {
    const correctionFor = (refCam: LinearRgb) => fitWhiteScaling({ measured: refCam, referenceLab: reference.lab }, white).correction;
    checkWhiteReference(reference.lab, reference.stats.linearRgb);
    const fixed = correctionFor(reference.stats.linearRgb);
    toLab = (camera, refCam) => linearSrgbToLab(applyCorrection(refCam ? correctionFor(refCam) : fixed, camera), white);
    toXyzD65 = (camera) => linearSrgbToXyzD65(applyCorrection(fixed, camera));
    flags.push("white-reference-only");
  } else {
    toLab = (camera) => linearSrgbToLab(camera, white);
    toXyzD65 = (camera) => linearSrgbToXyzD65(camera);
    flags.push("uncorrected");
  }
  const uncertainty = colourUncertainty({
    toLab,
    region: sample(stats, opts.encoding, opts.pixelsPerSample?.region),
    reference: reference ? sample(reference.stats, opts.encoding, opts.pixelsPerSample?.reference) : undefined,
    calibrationLabRms: calibration ? calibration.looLabRmsD65 : null,
  });
  const xyzD65 = toXyzD65(stats.linearRgb);
  const display = xyzToLinearSrgb(xyzD65, "D65");
  if (!linearSrgbInGamut(display)) flags.push("out-of-srgb-gamut");
  const { lab, ...u } = uncertainty;
  return { lab, lch: labToLch(lab), white, xyzD65, hex: linearSrgbToHex(display), uncertainty: u, flags };
}
