// How storage errors of a multipart upload reach the user. The local S3 fake does not produce these
// errors (it accepts any ETag and answers 500 for an unknown upload), so storage is replaced here by
// a stub that fails with the error codes S3's API reference documents for CompleteMultipartUpload
// and AbortMultipartUpload (NoSuchUpload, InvalidPart; MethodNotAllowed is s3rver's answer to an abort).
import { beforeEach, describe, expect, it, vi } from "vitest";

const storage = vi.hoisted(() => ({
  completeMultipartUpload: vi.fn(),
  abortMultipartUpload: vi.fn(),
}));
vi.mock("@/lib/storage", () => storage);

import { RuleError } from "@/lib/errors";
import { cancelUpload, completeUpload } from "@/lib/uploads/finish-upload";

const s3Error = (code: string) => Object.assign(new Error(code), { name: code, Code: code });
const request = { key: "k", uploadId: "u", parts: [{ partNumber: 1, etag: '"e"' }] };

beforeEach(() => {
  storage.completeMultipartUpload.mockReset();
  storage.abortMultipartUpload.mockReset();
});

describe("completing and cancelling multipart uploads", () => {
  it("turns a mismatched upload into a 422 that says to upload again", async () => {
    for (const code of ["NoSuchUpload", "InvalidPart", "InvalidPartOrder", "EntityTooSmall"]) {
      storage.completeMultipartUpload.mockRejectedValueOnce(s3Error(code));
      await expect(completeUpload(request)).rejects.toMatchObject({
        name: "RuleError",
        status: 422,
        message: `The upload could not be assembled in storage (${code}). Please upload the file again.`,
      });
    }
  });

  it("lets other storage failures through as server errors", async () => {
    storage.completeMultipartUpload.mockRejectedValueOnce(s3Error("InternalError"));
    await expect(completeUpload(request)).rejects.not.toBeInstanceOf(RuleError);
  });

  it("treats an upload that is already gone, or a store that cannot abort, as cancelled", async () => {
    const warn = vi.spyOn(console, "warn").mockImplementation(() => undefined);
    storage.abortMultipartUpload.mockRejectedValueOnce(s3Error("NoSuchUpload"));
    await expect(cancelUpload(request)).resolves.toBeUndefined();
    storage.abortMultipartUpload.mockRejectedValueOnce(s3Error("MethodNotAllowed"));
    await expect(cancelUpload(request)).resolves.toBeUndefined();
    expect(warn).toHaveBeenCalledTimes(1);
    storage.abortMultipartUpload.mockRejectedValueOnce(s3Error("AccessDenied"));
    await expect(cancelUpload(request)).rejects.toThrow("AccessDenied");
    warn.mockRestore();
  });
});
