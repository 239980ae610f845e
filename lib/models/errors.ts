/** Why a solvent model was not fitted: each refusal says what is missing, in words a chemist can act on. */
export type ModelRefusalCode =
  | "too-few-solvents"
  | "collinear-parameters"
  | "missing-parameters"
  | "too-many-flagged-colours"
  | "no-band-position"
  | "invalid-input";

/** A typed refusal: the fit would give numbers that mean nothing, so none are given. */
export class ModelRefusal extends Error {
  readonly code: ModelRefusalCode;
  constructor(code: ModelRefusalCode, message: string) {
    super(message);
    this.name = "ModelRefusal";
    this.code = code;
  }
}

export function isModelRefusal(error: unknown): error is ModelRefusal {
  return error instanceof ModelRefusal;
}
