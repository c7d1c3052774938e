import "server-only";
import { randomUUID } from "node:crypto";
import { buffer } from "node:stream/consumers";
import { findScoredCandidate, linkCandidateMapFile } from "@/db/queries/layout-plans";
import { getObjectStream, putObject } from "@/lib/storage";
import { buildUploadKey } from "@/lib/uploads/file-rules";
import { registerUpload } from "@/lib/uploads/register-upload";

/**
 * Registers a scored candidate's map as a layout file of the workspace, the way an uploaded
 * partition map is registered (registerUpload: checked header and preview, SHA-256, the same bytes
 * registered once), and returns the file; later calls return the same file. Undefined when the plan
 * has no such scored candidate in this workspace. The caller has checked that `userId` may upload.
 *
 * The map is copied to a fresh upload key first: registration removes the object it is given when
 * the same bytes are already a file here, and deleting the file later removes its object, while the
 * candidate's own map must stay downloadable with the plan.
 */
export async function registerCandidateMap(
  workspaceId: string,
  planId: string,
  ordinal: number,
  userId: string,
): Promise<string | undefined> {
  const candidate = await findScoredCandidate(workspaceId, planId, ordinal);
  if (!candidate) return undefined;
  if (candidate.mapFileId !== null) return candidate.mapFileId;
  const name = `${candidate.name}.csv`;
  const body = await buffer((await getObjectStream(candidate.mapObjectKey)).body);
  const key = buildUploadKey(workspaceId, name, randomUUID());
  await putObject({ key, body, contentLength: body.length, contentType: "text/csv" });
  const file = await registerUpload(workspaceId, userId, { key, name, kind: "layout" });
  return linkCandidateMapFile(workspaceId, planId, ordinal, file.id);
}
