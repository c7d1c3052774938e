import "server-only";
import { recordAudit, type AuditActor } from "@/db/queries/audit";
import { findFederatedClientByName } from "@/db/queries/federated-analyses";
import { insertClientKey } from "@/db/queries/federated-client-keys";
import { ENDED_FEDERATED_STATES } from "@/db/schema/federated";
import { CLIENT_KEYS } from "@/lib/auth/client-key-secret";
import { RuleError } from "@/lib/errors";
import { issueClientKeySchema } from "@/lib/validation/federated-analysis";
import { requireFederatedAnalysis } from "./federated-rules";

const DAY_MS = 24 * 60 * 60 * 1000;

/**
 * Issues a key for one client of the roster: it can send that client's digests to this analysis
 * and read its encoding, nothing else. The key is returned once and only its hash is stored.
 * Issuing another for the same client (a lost key) leaves the earlier ones valid until revoked.
 * Written to the workspace's audit log.
 */
export async function issueClientKey(
  workspaceId: string,
  actor: AuditActor,
  analysisId: string,
  input: unknown,
  now = new Date(),
): Promise<{ key: string; keyId: string; client: string; expiresAt: Date }> {
  const { client, lifetimeDays } = issueClientKeySchema.parse(input);
  const analysis = await requireFederatedAnalysis(workspaceId, analysisId);
  if (ENDED_FEDERATED_STATES.includes(analysis.state)) {
    throw new RuleError(409, "This analysis has ended; its clients need no more keys.");
  }
  const row = await findFederatedClientByName(analysisId, client);
  if (!row) {
    throw new RuleError(422, `“${client}” is not on this analysis's roster.`, "client");
  }
  const { secret: key, hash: keyHash } = CLIENT_KEYS.create();
  const inserted = await insertClientKey({
    clientId: row.id,
    keyHash,
    expiresAt: new Date(now.getTime() + lifetimeDays * DAY_MS),
    createdBy: actor.id,
  });
  // Owners see in the log who can send digests into the workspace, and until when.
  await recordAudit({
    workspaceId,
    actor,
    action: "client-key.issued",
    targetType: "client-key",
    targetId: inserted.id,
    details: {
      analysis: analysis.title,
      client,
      expiresOn: inserted.expiresAt.toISOString().slice(0, 10),
    },
  });
  return { key, keyId: inserted.id, client, expiresAt: inserted.expiresAt };
}
