import { CALIBRATION_METHODS, fitCalibration, type CalibrationMethodChoice, type CalibrationPatch } from "../color/calibration";
import type { LabWhite } from "../color/convert";
import { decodePhoto, measureRegion } from "../color/regions";
import type { Lab } from "../color/types";
import { asCliError, numberList, parse, parseBox, readInput } from "./color-commands";
import { CliError } from "./errors";

const CALIBRATE_USAGE =
  "use 'calibrate <image> --patch x,y,w,h=L,a,b [--patch ...] [--method white|matrix-3x3|root-polynomial-2|auto] [--white-point D65|D50]'";

function parsePatch(value: string): { box: [number, number, number, number]; lab: Lab } {
  const parts = value.split("=");
  if (parts.length !== 2) {
    throw new CliError(`--patch needs a region and its known colour as x,y,w,h=L,a,b, e.g. --patch 10,10,40,40=96,0,0, and got '${value}'.`);
  }
  const box = parseBox(parts[0], "--patch");
  const lab = numberList(parts[1], 3, "--patch colour", "96,0,0") as Lab;
  if (lab[0] < 0 || lab[0] > 100) throw new CliError(`--patch ${value} has L* ${lab[0]}, outside 0–100; give the patch's CIELAB L*, a*, b*.`);
  return { box, lab };
}

/**
 * `calibrate`: measures every --patch region of one card photo and fits a calibration from their
 * known CIELAB (lib/color/calibration.ts). Prints the calibration object, which `measure
 * --calibration` reads back; the measured patches are kept in it (`patches`) so it can be checked.
 */
export async function calibrateCommand(args: string[]): Promise<unknown> {
  const { values, positionals } = parse(
    args,
    { patch: { type: "string", multiple: true }, method: { type: "string" }, "white-point": { type: "string" } },
    CALIBRATE_USAGE,
  );
  if (positionals.length > 1) throw new CliError(`Give one card photo, not ${positionals.length} (${positionals.join(", ")}); ${CALIBRATE_USAGE}.`);
  const patches = (values.patch ?? []).map(parsePatch);
  if (patches.length === 0) throw new CliError(`Mark the card's patches with --patch x,y,w,h=L,a,b; ${CALIBRATE_USAGE}.`);
  const method = (values.method ?? "matrix-3x3") as CalibrationMethodChoice;
  if (method !== "auto" && !CALIBRATION_METHODS.includes(method)) {
    throw new CliError(`--method must be white, matrix-3x3, root-polynomial-2 or auto, not '${values.method}'.`);
  }
  const wp = (values["white-point"] ?? "D65").toUpperCase();
  if (wp !== "D65" && wp !== "D50") throw new CliError(`--white-point must be D65 or D50 (the white the patches' values were measured under), not '${values["white-point"]}'.`);
  const bytes = await readInput(positionals[0], "card photo", CALIBRATE_USAGE);
  try {
    const photo = await decodePhoto(bytes);
    const measured: CalibrationPatch[] = patches.map(({ box, lab }, i) => {
      const stats = measureRegion(photo, { shape: "rect", x: box[0], y: box[1], w: box[2], h: box[3] });
      return {
        name: `patch ${i + 1}`,
        camera: stats.linearRgb,
        referenceLab: lab,
        sd: stats.sd,
        pixels: stats.pixels - stats.rejected,
        clippedFraction: stats.clippedFraction,
        flags: stats.flags,
      };
    });
    const calibration = fitCalibration(measured, { method, whitePoint: wp as LabWhite });
    return {
      ...calibration,
      patches: measured.map((p, i) => ({ patch: i + 1, roi: patches[i].box, referenceLab: p.referenceLab, camera: p.camera, flags: p.flags })),
    };
  } catch (error) {
    asCliError(error);
  }
}
