"use server";

import { revalidatePath } from "next/cache";
import { insertApiToken, revokeApiToken } from "@/db/queries/api-tokens";
import { recordAudit } from "@/db/queries/audit";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { createApiTokenSchema, type CreateApiTokenInput } from "@/lib/auth/api-token-schema";
import { API_TOKENS } from "@/lib/auth/api-token-secret";
import { requireRole } from "@/lib/auth/guards";
import { roleAllows } from "@/lib/auth/roles";
import { RuleError } from "@/lib/errors";

const DAY_MS = 24 * 60 * 60 * 1000;

/**
 * Creates a personal API token for this workspace. The token is in this answer and nowhere else:
 * only its hash is stored, so the page shows it once.
 */
export async function createApiToken(
  workspaceId: string,
  input: CreateApiTokenInput,
): Promise<ActionResult<{ token: string; name: string; expiresAt: Date }>> {
  try {
    const { user } = await requireRole(workspaceId, "manageApiTokens");
    const { name, lifetimeDays } = createApiTokenSchema.parse(input);
    const { secret: token, hash: tokenHash } = API_TOKENS.create();
    const created = await insertApiToken({
      workspaceId,
      userId: user.id,
      name,
      tokenHash,
      expiresAt: new Date(Date.now() + lifetimeDays * DAY_MS),
    });
    // Owners see in the log who can reach the workspace without a browser, and until when.
    await recordAudit({
      workspaceId,
      actor: user,
      action: "api-token.created",
      targetType: "api-token",
      targetId: created.id,
      details: {
        name: created.name,
        owner: user.email,
        expiresOn: created.expiresAt.toISOString().slice(0, 10),
      },
    });
    revalidatePath(`/w/${workspaceId}/tokens`);
    return succeed({ token, name: created.name, expiresAt: created.expiresAt });
  } catch (error) {
    return failWith(error, "create-api-token");
  }
}

/**
 * Revokes a token in this workspace; it stops working at once. Owners may revoke anyone's (a leaked
 * token must be stoppable when its holder is away); everyone else only their own.
 */
export async function revokeApiTokenAction(
  workspaceId: string,
  tokenId: string,
): Promise<ActionResult> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "manageApiTokens");
    const holder = roleAllows(workspace.role, "revokeAnyApiToken") ? "anyone" : user.id;
    const revoked = await revokeApiToken(workspace.id, holder, tokenId);
    if (!revoked) throw new RuleError(404, "That token does not exist or is already revoked.");
    await recordAudit({
      workspaceId: workspace.id,
      actor: user,
      action: "api-token.revoked",
      targetType: "api-token",
      targetId: tokenId,
      details: { name: revoked.name, owner: revoked.holderEmail },
    });
    revalidatePath(`/w/${workspace.id}/tokens`);
    return succeed();
  } catch (error) {
    return failWith(error, "revoke-api-token");
  }
}
