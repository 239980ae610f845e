import { readFile } from "node:fs/promises";
import { parseArgs } from "node:util";
import type { LabWhite } from "../color/convert";
import { ColorInputError } from "../color/errors";
import type { WhitePointName } from "../color/illuminants";
import { measureCalibratedColour, type DayReference } from "../color/calibrated-measure";
import { decodePhoto, measureRegion, type RegionSpec } from "../color/regions";
import { fitPkaFromColours, parsePhSeriesCsv, type PhPoint } from "../color/pka";
import { fitTwoPkaFromColours } from "../color/pka-two-step";
import { parseAbsorbanceCsv, spectrumColour } from "../color/spectrum";
import type { Lab } from "../color/types";
import { readCalibrationFile } from "./calibration-file";
import { CliError } from "./errors";

const MEASURE_USAGE =
  "use 'measure <image> --roi x,y,w,h [--roi ...] [--white x,y,w,h --white-lab L,a,b] [--white-point D65|D50] [--calibration FILE]'";
const SPECTRUM_USAGE = "use 'spectrum <csv> [--illuminant D65|D50|A] [--scale k]'";

export function parse<T extends Record<string, { type: "string"; multiple?: boolean }>>(args: string[], options: T, usage: string) {
  try {
    return parseArgs({ args, options, strict: true, allowPositionals: true });
  } catch (error) {
    const { code, message } = error as { code?: string; message: string };
    const option = /'(-[^']*)'/.exec(message)?.[1] ?? "";
    if (code === "ERR_PARSE_ARGS_UNKNOWN_OPTION") throw new CliError(`Unknown option ${option}; ${usage}.`);
    if (code === "ERR_PARSE_ARGS_INVALID_OPTION_VALUE") {
      const name = option.replace(/ .*/, "");
      const hint = /ambiguous/.test(message) ? ` (write a value that starts with a dash as ${name}=-1)` : "";
      throw new CliError(`Option ${name} needs a value${hint}; ${usage}.`);
    }
    throw new CliError(`${message.replace(/\.\s.*$|\.$/, "")}; ${usage}.`);
  }
}

/** A plain decimal number (no hex, no empty string, no "1e", no trailing junk). */
export function toNumber(s: string): number {
  return /^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$/.test(s) ? Number(s) : NaN;
}

export function numberList(value: string, count: number, option: string, example: string): number[] {
  const parts = value.split(",");
  const nums = parts.map(toNumber);
  if (parts.length !== count || nums.some((n) => !Number.isFinite(n))) {
    throw new CliError(`${option} needs ${count} comma-separated numbers, e.g. ${option} ${example}, and got '${value}'.`);
  }
  return nums;
}

export function parseBox(value: string, option: string): [number, number, number, number] {
  const nums = numberList(value, 4, option, "120,80,200,200");
  if (!nums.every((n) => Number.isInteger(n) && n >= 0)) {
    throw new CliError(`${option} takes whole non-negative pixel numbers x,y,w,h, and got '${value}'.`);
  }
  if (nums[2] === 0 || nums[3] === 0) throw new CliError(`The region ${option} ${value} is empty; give it a width and height of at least one pixel.`);
  return nums as [number, number, number, number];
}

export async function readInput(file: string | undefined, what: string, usage: string): Promise<Buffer> {
  if (!file) throw new CliError(`Give the ${what} file to read; ${usage}.`);
  try {
    return await readFile(file);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === "ENOENT") throw new CliError(`The file ${file} does not exist; check the path.`);
    if (code === "EISDIR") throw new CliError(`The path ${file} is a folder, not a file; give the path of the ${what} file.`);
    if (code === "EACCES" || code === "EPERM") throw new CliError(`The file ${file} cannot be read (permission denied); check its permissions.`);
    throw new CliError(`The file ${file} cannot be read (${code ?? "unknown error"}); check the path.`);
  }
}

export function asCliError(error: unknown): never {
  if (error instanceof ColorInputError) throw new CliError(error.message);
  throw error;
}

export async function measureCommand(args: string[]): Promise<unknown> {
  const { values, positionals } = parse(
    args,
    {
      roi: { type: "string", multiple: true },
      white: { type: "string" },
      "white-lab": { type: "string" },
      "white-point": { type: "string" },
      calibration: { type: "string" },
    },
    MEASURE_USAGE,
  );
  if (positionals.length > 1) throw new CliError(`Give one image, not ${positionals.length} (${positionals.join(", ")}); ${MEASURE_USAGE}.`);
  const rois = (values.roi ?? []).map((r) => parseBox(r, "--roi"));
  if (rois.length === 0) throw new CliError(`Mark at least one region with --roi x,y,w,h; ${MEASURE_USAGE}.`);
  const wp = (values["white-point"] ?? "D65").toUpperCase();
  if (wp !== "D65" && wp !== "D50") throw new CliError(`--white-point must be D65 or D50, not '${values["white-point"]}'.`);
  const white = wp as LabWhite;
  if ((values.white === undefined) !== (values["white-lab"] === undefined)) {
    throw new CliError("--white and --white-lab go together: mark the reference patch with --white x,y,w,h and give its known colour with --white-lab L,a,b.");
  }
  const whiteBox = values.white !== undefined ? parseBox(values.white, "--white") : undefined;
  const whiteLab = values["white-lab"] !== undefined ? (numberList(values["white-lab"], 3, "--white-lab", "95,0,0") as Lab) : undefined;
  const bytes = await readInput(positionals[0], "image", MEASURE_USAGE);

  const calibration = values.calibration !== undefined ? await readCalibrationFile(values.calibration) : null;

  try {
    const photo = await decodePhoto(bytes);
    const rect = (b: number[]): RegionSpec => ({ shape: "rect", x: b[0], y: b[1], w: b[2], h: b[3] });
    let reference: DayReference | undefined;
    let referenceFlags: string[] = [];
    if (whiteBox && whiteLab) {
      reference = { stats: measureRegion(photo, rect(whiteBox)), lab: whiteLab };
      referenceFlags = reference.stats.flags.map((f) => `reference-${f}`);
    }
    const measurements = rois.map((box) => {
      const stats = measureRegion(photo, rect(box));
      // The calibration (if any) first, then the day's --white reference: see measureCalibratedColour.
      const colour = measureCalibratedColour(stats, { calibration, white, reference, encoding: photo.format });
      return {
        roi: box,
        lab: colour.lab,
        lch: colour.lch,
        hex: colour.hex,
        pixels: stats.pixels,
        rejected: stats.rejected,
        flags: [...colour.flags, ...referenceFlags],
        // Added to the contract's fields: the region's pixel-to-pixel scatter in ΔE*ab, and the
        // combined standard uncertainty (± ΔE00) with u(L*), u(a*), u(b*) (lib/color/uncertainty.ts).
        spread: stats.spread,
        uncertaintyDeltaE00: colour.uncertainty.uDeltaE00,
        uncertaintyLab: colour.uncertainty.uLab,
        uncertaintyIncludesCalibration: colour.uncertainty.calibrationIncluded,
      };
    });
    return { measurements };
  } catch (error) {
    asCliError(error);
  }
}

export async function spectrumCommand(args: string[]): Promise<unknown> {
  const { values, positionals } = parse(args, { illuminant: { type: "string" }, scale: { type: "string" } }, SPECTRUM_USAGE);
  if (positionals.length > 1) throw new CliError(`Give one spectrum file, not ${positionals.length}; ${SPECTRUM_USAGE}.`);
  const ill = (values.illuminant ?? "D65").toUpperCase();
  if (ill !== "D65" && ill !== "D50" && ill !== "A") throw new CliError(`--illuminant must be D65, D50 or A, not '${values.illuminant}'.`);
  let scale = 1;
  if (values.scale !== undefined) {
    scale = toNumber(values.scale);
    if (!Number.isFinite(scale) || scale < 0) throw new CliError(`--scale needs a non-negative number, e.g. --scale 0.5, and got '${values.scale}'.`);
  }
  const bytes = await readInput(positionals[0], "spectrum CSV", SPECTRUM_USAGE);
  try {
    const text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
    const colour = spectrumColour(parseAbsorbanceCsv(text), ill as WhitePointName, scale);
    return {
      xyz: colour.xyz,
      lab: colour.lab,
      hex: colour.hex,
      lambdaMaxNm: colour.lambdaMaxNm,
      transitionEnergyKcalMol: colour.transitionEnergyKcalMol,
    };
  } catch (error) {
    if (error instanceof TypeError) throw new CliError("The spectrum file is not UTF-8 text; save it as a plain CSV file.");
    asCliError(error);
  }
}

const PKA_USAGE = "use 'pka <csv> [--blank L,a,b] [--steps 1|2]'";

/** `--steps 2`: a two-step indicator (H2In ⇌ HIn⁻ ⇌ In²⁻), beyond the contract's one-pKa output. */
function twoStepOutput(points: PhPoint[], blank: Lab) {
  const fit = fitTwoPkaFromColours(points, blank);
  return {
    steps: 2,
    pKas: fit.pKas,
    pKaStdErrs: fit.pKaStdErrs,
    transitions: fit.transitions,
    acidLab: fit.labs[0],
    intermediateLab: fit.labs[1],
    baseLab: fit.labs[2],
    rmsDeltaE00: fit.rmsDeltaE00,
    method: fit.method,
    apparent: true,
    transitionThresholdDeltaE00: fit.transitionThresholdDeltaE00,
    bootstrapRuns: fit.bootstrapRuns,
    bands: fit.bands,
  };
}

export async function pkaCommand(args: string[]): Promise<unknown> {
  const { values, positionals } = parse(args, { blank: { type: "string" }, steps: { type: "string" } }, PKA_USAGE);
  if (values.steps !== undefined && values.steps !== "1" && values.steps !== "2") throw new CliError(`--steps is 1 (one colour change) or 2 (two changes, H2In ⇌ HIn⁻ ⇌ In²⁻), not “${values.steps}”; ${PKA_USAGE}.`);
  if (positionals.length > 1) throw new CliError(`Give one pH series file, not ${positionals.length}; ${PKA_USAGE}.`);
  const blank = values.blank !== undefined ? (numberList(values.blank, 3, "--blank", "100,0,0") as Lab) : ([100, 0, 0] as Lab);
  const bytes = await readInput(positionals[0], "pH series CSV", PKA_USAGE);
  try {
    const text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
    const points = parsePhSeriesCsv(text);
    if (values.steps === "2") return twoStepOutput(points, blank);
    const fit = fitPkaFromColours(points, blank);
    return {
      pKa: fit.pKa,
      pKaStdErr: fit.pKaStdErr,
      transition: fit.transition,
      acidLab: fit.acidLab,
      baseLab: fit.baseLab,
      rmsDeltaE00: fit.rmsDeltaE00,
      // Beyond the contract: how the figures were made and what to watch.
      method: fit.method,
      apparent: true,
      transitionThresholdDeltaE00: fit.transitionThresholdDeltaE00,
      bootstrapRuns: fit.bootstrapRuns,
      acidBand: fit.acidBand,
      baseBand: fit.baseBand,
      flags: fit.flags,
      messages: fit.messages,
    };
  } catch (error) {
    if (error instanceof TypeError) throw new CliError("The pH series file is not UTF-8 text; save it as a plain CSV file.");
    asCliError(error);
  }
}
