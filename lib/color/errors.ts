/**
 * Bad input to the colour engine: an unsupported, truncated or oversized photo, a region off the
 * image, a malformed spectrum, an ill-conditioned fit. The message is one sentence that says what is
 * wrong and what to do; callers may show it to the person as it is.
 */
export class ColorInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ColorInputError";
  }
}
