import { createHash, randomBytes } from "node:crypto";

/**
 * Every client key starts with this prefix, distinct from the API tokens' `prtk_`: a key pasted
 * anywhere can be found with one search, and the API's token guard refuses it before asking the
 * database, so a client key can never act as a person.
 */
export const CLIENT_KEY_PREFIX = "prck_";

/** A key as the analyst sees it once: the prefix and 256 random bits, URL-safe. */
const KEY_PATTERN = /^prck_[A-Za-z0-9_-]{43}$/;

/** A fresh client key and the SHA-256 that is stored in its place. */
export function createClientKeySecret(): { key: string; keyHash: string } {
  const key = `${CLIENT_KEY_PREFIX}${randomBytes(32).toString("base64url")}`;
  return { key, keyHash: hashClientKey(key) };
}

export function hashClientKey(key: string): string {
  return createHash("sha256").update(key).digest("hex");
}

/** True for text shaped like a client key; anything else is refused before the database is asked. */
export function looksLikeClientKey(text: string): boolean {
  return KEY_PATTERN.test(text);
}
