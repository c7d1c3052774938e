import { createHash, randomBytes } from "node:crypto";

/**
 * Every Partita API token starts with this prefix, so a token pasted into a log, a ticket or a
 * repository can be found with one search (`grep -r prtk_`) and secret scanners can match it.
 */
export const API_TOKEN_PREFIX = "prtk_";

/** A token as the user sees it once: the prefix and 256 random bits, URL-safe. */
const TOKEN_PATTERN = /^prtk_[A-Za-z0-9_-]{43}$/;

/** A fresh token and the SHA-256 that is stored in its place. */
export function createApiTokenSecret(): { token: string; tokenHash: string } {
  const token = `${API_TOKEN_PREFIX}${randomBytes(32).toString("base64url")}`;
  return { token, tokenHash: hashApiToken(token) };
}

export function hashApiToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

/** True for text shaped like a token; anything else is refused before the database is asked. */
export function looksLikeApiToken(text: string): boolean {
  return TOKEN_PATTERN.test(text);
}
