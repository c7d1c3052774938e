/** Raised by guards; actions turn it into a result, route handlers into an HTTP status. */
export class AccessError extends Error {
  constructor(
    readonly status: 401 | 403 | 404,
    message: string,
  ) {
    super(message);
    this.name = "AccessError";
  }
}

export const notSignedIn = () => new AccessError(401, "Please sign in to continue.");
export const forbidden = () =>
  new AccessError(403, "Your role in this workspace does not allow that.");
// A workspace you are not a member of looks exactly like one that does not exist.
export const workspaceNotFound = () => new AccessError(404, "That workspace does not exist.");
