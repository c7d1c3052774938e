/**
 * An error the API answers with its own stable code (clients branch on `code`, people read
 * `message`). Shared product errors (AccessError, RuleError, zod) are mapped in respond.ts.
 */
export class ApiError extends Error {
  constructor(
    readonly status: 401 | 403 | 404 | 422 | 429,
    readonly code: string,
    message: string,
    readonly retryAfterSeconds?: number,
  ) {
    super(message);
    this.name = "ApiError";
  }
}

export const missingToken = () =>
  new ApiError(
    401,
    "missing_token",
    "Send a personal API token as `Authorization: Bearer prtk_…`; create one on the workspace's API tokens page.",
  );
export const unknownToken = () =>
  new ApiError(
    401,
    "invalid_token",
    "This API token is not valid. Check that it was copied whole.",
  );
export const revokedToken = () =>
  new ApiError(401, "token_revoked", "This API token was revoked. Create a new one.");
export const expiredToken = (expiresAt: Date) =>
  new ApiError(
    401,
    "token_expired",
    `This API token expired on ${expiresAt.toISOString().slice(0, 10)}. Create a new one.`,
  );
// A user who left the workspace keeps the token row, but it grants nothing any more.
export const formerMemberToken = () =>
  new ApiError(
    401,
    "token_no_access",
    "This API token's owner is no longer a member of its workspace.",
  );
export const rateLimited = (retryAfterSeconds: number) =>
  new ApiError(
    429,
    "rate_limited",
    `Too many requests with this token. Wait ${retryAfterSeconds} s and try again.`,
    retryAfterSeconds,
  );
