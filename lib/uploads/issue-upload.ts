import "server-only";
import { randomUUID } from "node:crypto";
import { RuleError } from "@/lib/errors";
import { createMultipartUpload, presignPut, presignUploadPart } from "@/lib/storage";
import type { UploadTicket } from "@/lib/validation/upload";
import {
  buildUploadKey,
  findUploadProblem,
  isUploadKeyOf,
  planUpload,
  storedContentTypeOf,
  type DataFileKind,
} from "./file-rules";

/**
 * How long an upload URL works. A single PUT starts at once; parts of a large upload start one
 * after another, so theirs last longer, and the browser asks for fresh ones when they grow old.
 */
export const SINGLE_PUT_URL_SECONDS = 300;
export const PART_URL_SECONDS = 900;

/**
 * Checks a file the browser wants to upload (type, emptiness, size — before any byte is sent) and
 * hands out a fresh key under the workspace's prefix with a presigned PUT, or a multipart upload
 * with a presigned URL per part. Each URL is for that one key only.
 */
export async function issueUpload(request: {
  workspaceId: string;
  file: { name: string; size: number; contentType: string };
  kind: DataFileKind;
  maxBytes: number;
}): Promise<UploadTicket> {
  const { workspaceId, file, kind, maxBytes } = request;
  const problem = findUploadProblem(file, kind, maxBytes);
  if (problem) throw new RuleError(422, problem, "file");
  const key = buildUploadKey(workspaceId, file.name, randomUUID());
  const contentType = storedContentTypeOf(file.name, kind);
  const plan = planUpload(file.size);
  if (plan.method === "single") {
    const url = await presignPut({ key, contentType, expiresInSeconds: SINGLE_PUT_URL_SECONDS });
    return { method: "single", key, url, headers: { "content-type": contentType } };
  }
  const uploadId = await createMultipartUpload({ key, contentType });
  const partNumbers = Array.from({ length: plan.partCount }, (_, index) => index + 1);
  return {
    method: "multipart",
    key,
    uploadId,
    partSize: plan.partSize,
    parts: await signParts(key, uploadId, partNumbers),
  };
}

/** Presigned URLs for parts of a multipart upload under one key. */
export async function signParts(
  key: string,
  uploadId: string,
  partNumbers: number[],
): Promise<{ partNumber: number; url: string }[]> {
  return Promise.all(
    partNumbers.map(async (partNumber) => ({
      partNumber,
      url: await presignUploadPart({
        key,
        uploadId,
        partNumber,
        expiresInSeconds: PART_URL_SECONDS,
      }),
    })),
  );
}

/** Multipart calls name a key the browser got from issueUpload; any other key is refused. */
export function assertUploadKeyOf(workspaceId: string, key: string): void {
  if (!isUploadKeyOf(workspaceId, key)) {
    throw new RuleError(404, "There is no such upload in this workspace.");
  }
}
