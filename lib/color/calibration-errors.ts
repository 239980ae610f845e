import { ColorInputError } from "./errors";

/** Why a calibration was refused; callers can branch on it, people read the message. */
export type CalibrationRefusal =
  | "too-few-patches"
  | "too-few-greys"
  | "greys-only"
  | "greys-alike"
  | "greys-not-monotone"
  | "grey-black"
  | "no-white"
  | "white-not-neutral"
  | "white-too-dark"
  | "clipped-patch"
  | "non-uniform-patch"
  | "empty-patch"
  | "invalid-patch"
  | "singular-fit"
  | "unknown-method"
  | "invalid-calibration";

/**
 * A refused calibration: one sentence that says what is wrong and what to do. It is a
 * ColorInputError, so every place that already turns bad colour input into a clear message (the
 * CLI, the routes) handles it too.
 */
export class CalibrationError extends ColorInputError {
  readonly code: CalibrationRefusal;
  constructor(code: CalibrationRefusal, message: string) {
    super(message);
    this.name = "CalibrationError";
    this.code = code;
  }
}
