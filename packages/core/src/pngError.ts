/** Thrown when bytes are not a PNG the core can read; the message says what was found. */
export class PngError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PngError";
  }
}
