import "server-only";
import { RuleError } from "@/lib/errors";
import { abortMultipartUpload, completeMultipartUpload, type UploadedPart } from "@/lib/storage";

/** S3 error codes that mean the browser's report of a multipart upload does not match storage. */
const UPLOAD_MISMATCH_CODES = new Set([
  "NoSuchUpload",
  "InvalidPart",
  "InvalidPartOrder",
  "EntityTooSmall",
]);

const errorCodeOf = (error: unknown) =>
  error instanceof Error ? ((error as Error & { Code?: string }).Code ?? error.name) : undefined;

/**
 * Assembles a multipart upload. An unknown upload id, a missing part or a wrong ETag is the
 * caller's problem (422, with a message saying to upload again), not a server failure.
 */
export async function completeUpload(request: {
  key: string;
  uploadId: string;
  parts: UploadedPart[];
}): Promise<void> {
  try {
    await completeMultipartUpload(request);
  } catch (error) {
    const code = errorCodeOf(error);
    if (code && UPLOAD_MISMATCH_CODES.has(code)) {
      throw new RuleError(
        422,
        `The upload could not be assembled in storage (${code}). Please upload the file again.`,
      );
    }
    throw error;
  }
}

/**
 * Drops a multipart upload; one that is already gone counts as dropped. Some S3-compatible stores
 * (the local fake, s3rver 3.7) cannot abort at all: their unfinished parts never become an object,
 * and on S3 itself a bucket lifecycle rule (AbortIncompleteMultipartUpload) is the backstop.
 */
export async function cancelUpload(request: { key: string; uploadId: string }): Promise<void> {
  try {
    await abortMultipartUpload(request);
  } catch (error) {
    const code = errorCodeOf(error);
    if (code === "NoSuchUpload") return;
    if (code === "MethodNotAllowed" || code === "NotImplemented") {
      console.warn(
        `[abort-upload] storage cannot abort multipart uploads (${code}); parts are left`,
      );
      return;
    }
    throw error;
  }
}
