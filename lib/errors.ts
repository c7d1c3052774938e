/**
 * A rule of the product was broken by a well-formed request (e.g. removing the last owner).
 * The message is written for the person who made the request and is safe to show them.
 */
export class RuleError extends Error {
  constructor(
    readonly status: 404 | 409 | 410 | 422 | 429,
    message: string,
    readonly field?: string,
  ) {
    super(message);
    this.name = "RuleError";
  }
}
