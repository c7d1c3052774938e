/** A bearer secret's row state (API tokens, client keys): revoked, expired, or live until it expires. */
export function describeSecretState(
  secret: { revokedAt: Date | null; expiresAt: Date },
  now: Date,
  dateFormat: Intl.DateTimeFormat,
): { label: string; live: boolean } {
  if (secret.revokedAt) {
    return { label: `Revoked ${dateFormat.format(secret.revokedAt)}`, live: false };
  }
  if (secret.expiresAt <= now) {
    return { label: `Expired ${dateFormat.format(secret.expiresAt)}`, live: false };
  }
  return { label: `Expires ${dateFormat.format(secret.expiresAt)}`, live: true };
}
