import { readFile } from "node:fs/promises";
import { parseCalibration, type Calibration } from "../color/calibration";
import { ColorInputError } from "../color/errors";
import { CliError } from "./errors";

/** Reads and checks a calibration file written by `calibrate`; every failure is one clear sentence. */
export async function readCalibrationFile(file: string): Promise<Calibration> {
  if (!file.trim()) throw new CliError("--calibration needs the path of a calibration file made by the calibrate command.");
  let text: string;
  try {
    text = await readFile(file, "utf8");
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === "ENOENT") throw new CliError(`The calibration file ${file} does not exist; check the path or make it with the calibrate command.`);
    if (code === "EISDIR") throw new CliError(`The path ${file} is a folder, not a calibration file; give the file the calibrate command wrote.`);
    throw new CliError(`The calibration file ${file} cannot be read (${code ?? "unknown error"}); check its path and permissions.`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw new CliError(`The calibration file ${file} is not JSON; give the file the calibrate command wrote, unchanged.`);
  }
  try {
    return parseCalibration(json);
  } catch (error) {
    if (error instanceof ColorInputError) throw new CliError(error.message);
    throw error;
  }
}
