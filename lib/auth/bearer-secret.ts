import { createHash, randomBytes } from "node:crypto";
import type { ApiError } from "@/lib/api/errors";

/**
 * One kind of bearer secret (personal API tokens, federated client keys): a prefix of its own and
 * 256 random bits, URL-safe. The prefix lets a secret pasted into a log, a ticket or a repository
 * be found with one search and matched by secret scanners, and lets each guard refuse the other
 * kind before asking the database. Only the secret's SHA-256 is stored.
 */
export class BearerSecretKind {
  private readonly pattern: RegExp;

  constructor(readonly prefix: string) {
    this.pattern = new RegExp(`^${prefix}[A-Za-z0-9_-]{43}$`);
  }

  /** A fresh secret, shown once, and the hash stored in its place. */
  create(): { secret: string; hash: string } {
    const secret = `${this.prefix}${randomBytes(32).toString("base64url")}`;
    return { secret, hash: hashBearerSecret(secret) };
  }

  /** True for text shaped like this kind; anything else is refused before the database is asked. */
  looksLike(text: string): boolean {
    return this.pattern.test(text);
  }
}

export function hashBearerSecret(secret: string): string {
  return createHash("sha256").update(secret).digest("hex");
}

/** What a guard answers, in its own words, when the bearer secret does not let the caller in. */
export interface BearerRefusals {
  missing: () => ApiError;
  unknown: () => ApiError;
  revoked: () => ApiError;
  expired: (expiresAt: Date) => ApiError;
}

/**
 * The stored grant that a request's `Authorization: Bearer …` secret names: refused when the
 * header is missing, the secret is not of this kind or not known, or the grant is revoked or
 * expired (checked on every request, so a revocation takes effect at once).
 */
export async function findBearerGrant<Grant extends { revokedAt: Date | null; expiresAt: Date }>(
  request: Request,
  kind: BearerSecretKind,
  findByHash: (hash: string) => Promise<Grant | undefined>,
  refuse: BearerRefusals,
  now: Date,
): Promise<Grant> {
  const match = /^Bearer\s+(\S+)\s*$/i.exec(request.headers.get("authorization") ?? "");
  if (!match) throw refuse.missing();
  const secret = match[1];
  const grant = kind.looksLike(secret) ? await findByHash(hashBearerSecret(secret)) : undefined;
  if (!grant) throw refuse.unknown();
  if (grant.revokedAt) throw refuse.revoked();
  if (grant.expiresAt <= now) throw refuse.expired(grant.expiresAt);
  return grant;
}
