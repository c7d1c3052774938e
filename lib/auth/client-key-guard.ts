import "server-only";
import { findClientKeyGrant, recordClientKeyUse } from "@/db/queries/federated-client-keys";
import { markClientSeen } from "@/db/queries/federated-analyses";
import { ApiError } from "@/lib/api/errors";
import { consumeOrRefuse } from "@/lib/api/rate-limit";
import { sharedLimiter } from "@/lib/rate-limits/shared-limiter";
import { findBearerGrant, type BearerRefusals } from "./bearer-secret";
import { CLIENT_KEYS } from "./client-key-secret";

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

const refuseKey: BearerRefusals = {
  missing: () =>
    keyError(
      "missing_key",
      `Send the client key the analyst issued as \`Authorization: Bearer ${CLIENT_KEYS.prefix}…\`.`,
    ),
  unknown: () =>
    keyError("invalid_key", "This client key is not valid. Check that it was copied whole."),
  revoked: () =>
    keyError("key_revoked", "This client key was revoked. Ask the analyst for a new one."),
  expired: (expiresAt) =>
    keyError(
      "key_expired",
      `This client key expired on ${expiresAt.toISOString().slice(0, 10)}. Ask the analyst for a new one.`,
    ),
};

/**
 * First line of every client-key route: the bearer key names one client of one federated
 * analysis (the only thing it reaches); expiry and revocation are checked on every request, the
 * per-key rate limit counted, and the client marked as seen for the roster.
 */
export async function requireClientKey(request: Request, now = new Date()): Promise<ClientCaller> {
  const grant = await findBearerGrant(request, CLIENT_KEYS, findClientKeyGrant, refuseKey, now);
  await consumeOrRefuse(perKey, grant.keyId);
  await Promise.all([recordClientKeyUse(grant.keyId, now), markClientSeen(grant.client.id, now)]);
  return {
    keyId: grant.keyId,
    client: grant.client,
    analysisId: grant.analysisId,
    workspaceId: grant.workspaceId,
  };
}
