import "server-only";
import {
  findApiTokenGrant,
  recordApiTokenUse,
  TOKEN_USE_RESOLUTION_MS,
} from "@/db/queries/api-tokens";
import type { WorkspaceSummary } from "@/db/queries/workspaces";
import {
  expiredToken,
  formerMemberToken,
  missingToken,
  revokedToken,
  unknownToken,
} from "@/lib/api/errors";
import { consumeApiRequest } from "@/lib/api/rate-limit";
import { forbidden } from "./errors";
import { API_TOKENS } from "./api-token-secret";
import { findBearerGrant } from "./bearer-secret";
import { roleAllows, type Capability } from "./roles";
import type { SessionUser } from "./session";

export type TokenCaller = {
  user: SessionUser;
  workspace: WorkspaceSummary;
  tokenId: string;
  tokenName: string;
};

/**
 * First line of every /api/v1 handler, the API's requireRole: the bearer token names a user and a
 * workspace, and the user's role there is read from the database on every request, so a role
 * change or a removal takes effect at once. Then the same capability check as requireRole, the
 * per-token rate limit, and the token's last use is recorded (to the minute).
 */
export async function requireToken(
  request: Request,
  capability: Capability,
  now = new Date(),
): Promise<TokenCaller> {
  const grant = await findBearerGrant(
    request,
    API_TOKENS,
    findApiTokenGrant,
    { missing: missingToken, unknown: unknownToken, revoked: revokedToken, expired: expiredToken },
    now,
  );
  if (!grant.role) throw formerMemberToken();
  await consumeApiRequest(grant.tokenId);
  // Most requests of a busy token skip the write: its recorded use is still within the minute.
  if (!grant.lastUsedAt || now.getTime() - grant.lastUsedAt.getTime() >= TOKEN_USE_RESOLUTION_MS) {
    await recordApiTokenUse(grant.tokenId, now);
  }
  if (!roleAllows(grant.role, capability)) throw forbidden();
  return {
    user: grant.user,
    workspace: { ...grant.workspace, role: grant.role },
    tokenId: grant.tokenId,
    tokenName: grant.tokenName,
  };
}
