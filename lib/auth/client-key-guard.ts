import "server-only";
import { findClientKeyGrant, recordClientKeyUse } from "@/db/queries/federated-client-keys";
import { markClientSeen } from "@/db/queries/federated-analyses";
import { ApiError, rateLimited } from "@/lib/api/errors";
import { RateLimiterRes, sharedLimiter } from "@/lib/rate-limits/shared-limiter";
import { hashClientKey, looksLikeClientKey } from "./client-key-secret";

/** Who a client key speaks for: one client of one federated analysis, nothing more. */
export type ClientCaller = {
  keyId: string;
  client: { id: string; name: string };
  analysisId: string;
  workspaceId: string;
};

/**
 * Requests per client key per minute. The fit asks one evaluation at a time and each costs the
 * client a long poll and an answer, so a fast fit of a small model needs a few hundred a minute.
 */
export const CLIENT_KEY_REQUESTS_PER_MINUTE = 1200;

const perKey = sharedLimiter({
  keyPrefix: "client-key",
  points: CLIENT_KEY_REQUESTS_PER_MINUTE,
  duration: 60,
});

const keyError = (code: string, message: string) => new ApiError(401, code, message);

/**
 * First line of every client-key route: the bearer key names one client of one federated
 * analysis (the only thing it reaches); expiry and revocation are checked on every request, the
 * per-key rate limit counted, and the client marked as seen for the roster.
 */
export async function requireClientKey(request: Request, now = new Date()): Promise<ClientCaller> {
  const match = /^Bearer\s+(\S+)\s*$/i.exec(request.headers.get("authorization") ?? "");
  if (!match) {
    throw keyError(
      "missing_key",
      "Send the client key the analyst issued as `Authorization: Bearer prck_…`.",
    );
  }
  const key = match[1];
  const grant = looksLikeClientKey(key) ? await findClientKeyGrant(hashClientKey(key)) : undefined;
  if (!grant) {
    throw keyError("invalid_key", "This client key is not valid. Check that it was copied whole.");
  }
  if (grant.revokedAt) {
    throw keyError("key_revoked", "This client key was revoked. Ask the analyst for a new one.");
  }
  if (grant.expiresAt <= now) {
    throw keyError(
      "key_expired",
      `This client key expired on ${grant.expiresAt.toISOString().slice(0, 10)}. Ask the analyst for a new one.`,
    );
  }
  try {
    await perKey.consume(grant.keyId);
  } catch (rejection) {
    if (rejection instanceof RateLimiterRes) {
      throw rateLimited(Math.max(1, Math.ceil(rejection.msBeforeNext / 1000)));
    }
    throw rejection;
  }
  await Promise.all([recordClientKeyUse(grant.keyId, now), markClientSeen(grant.client.id, now)]);
  return {
    keyId: grant.keyId,
    client: grant.client,
    analysisId: grant.analysisId,
    workspaceId: grant.workspaceId,
  };
}
