"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { RuleError } from "@/lib/errors";
import {
  acceptGradientDigest,
  acceptSchemaDigest,
  cancelFederatedAnalysis,
  closeRoster,
  createFederatedAnalysis,
  findRosterSender,
  issueClientKey,
  revokeClientKey,
} from "@/lib/federated";
import {
  digestUploadSchema,
  type DigestUploadInput,
  type IssueClientKeyInput,
  type IssuedClientKey,
} from "@/lib/validation/federated-analysis";
import {
  federatedFormSchema,
  formPathOf,
  toFederatedRequest,
  type FederatedFormValues,
} from "@/lib/validation/federated-form";

const rosterPage = (workspaceId: string, analysisId: string) =>
  `/w/${workspaceId}/federated/${analysisId}`;

/**
 * Creates a federated analysis from the web form: the form's values are checked as in the
 * browser, then the request they stand for; its field errors come back on the form's fields.
 */
export async function createFederatedFromForm(
  workspaceId: string,
  values: FederatedFormValues,
): Promise<ActionResult<{ analysisId: string }>> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    const request = toFederatedRequest(federatedFormSchema.parse(values));
    try {
      return succeed(await createFederatedAnalysis(workspaceId, user.id, request));
    } catch (error) {
      if (!(error instanceof z.ZodError)) throw error;
      const failed = failWith(error, "create-federated-analysis");
      if (failed.ok) return failed;
      const fieldErrors: Record<string, string> = {};
      for (const [path, message] of Object.entries(failed.fieldErrors)) {
        fieldErrors[formPathOf(path) ?? "form"] ??= message;
      }
      return { ...failed, fieldErrors };
    }
  } catch (error) {
    return failWith(error, "create-federated-analysis");
  }
}

/** Issues a key for one client of the roster; the key is in this answer and nowhere else. */
export async function issueFederatedClientKey(
  workspaceId: string,
  analysisId: string,
  input: IssueClientKeyInput,
): Promise<ActionResult<IssuedClientKey>> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    const issued = await issueClientKey(workspaceId, user, analysisId, input);
    revalidatePath(rosterPage(workspaceId, analysisId));
    return succeed(issued);
  } catch (error) {
    return failWith(error, "issue-client-key");
  }
}

/** Revokes a client key at once: its client can send nothing more with it. */
export async function revokeFederatedClientKey(
  workspaceId: string,
  analysisId: string,
  keyId: string,
): Promise<ActionResult> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    await revokeClientKey(workspaceId, user, analysisId, keyId);
    revalidatePath(rosterPage(workspaceId, analysisId));
    return succeed();
  } catch (error) {
    return failWith(error, "revoke-client-key");
  }
}

/** Ends round 1 without the clients still missing; the report will name them. */
export async function closeFederatedRoster(
  workspaceId: string,
  analysisId: string,
): Promise<ActionResult<{ missing: string[] }>> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    const { missing } = await closeRoster(workspaceId, user, analysisId);
    revalidatePath(rosterPage(workspaceId, analysisId));
    return succeed({ missing });
  } catch (error) {
    return failWith(error, "close-roster");
  }
}

/** Stops the analysis for good: its clients are told it ended, and no report is made. */
export async function cancelFederated(
  workspaceId: string,
  analysisId: string,
): Promise<ActionResult> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    await cancelFederatedAnalysis(workspaceId, user, analysisId);
    revalidatePath(rosterPage(workspaceId, analysisId));
    return succeed();
  } catch (error) {
    return failWith(error, "cancel-federated-analysis");
  }
}

/**
 * A client's digest file (what `npm run digest -- schema …` or `gradients …` wrote) uploaded by
 * the analyst on that client's behalf: accepted exactly as if the client had sent it, or refused
 * with a message naming the file, the client and the shard; nothing already accepted changes.
 */
export async function uploadClientDigest(
  workspaceId: string,
  analysisId: string,
  input: DigestUploadInput,
): Promise<ActionResult<{ repeated: boolean }>> {
  try {
    await requireRole(workspaceId, "runAnalysis");
    const upload = digestUploadSchema.parse(input);
    const sender = await findRosterSender(workspaceId, analysisId, upload.client);
    let document: unknown;
    try {
      document = JSON.parse(upload.text);
    } catch (error) {
      throw new RuleError(
        422,
        `${upload.fileName}: not JSON (${(error as Error).message}); expected the file npm run digest -- ${upload.round} wrote for client “${upload.client}”.`,
        "file",
      );
    }
    try {
      const accepted =
        upload.round === "schema"
          ? await acceptSchemaDigest(sender, document)
          : await acceptGradientDigest(sender, document);
      revalidatePath(rosterPage(workspaceId, analysisId));
      return succeed({ repeated: accepted.repeated });
    } catch (error) {
      if (error instanceof RuleError) {
        throw new RuleError(error.status, `${upload.fileName}: ${error.message}`, "file");
      }
      throw error;
    }
  } catch (error) {
    return failWith(error, "upload-client-digest");
  }
}
