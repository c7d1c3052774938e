import {
  AbortMultipartUploadCommand,
  CompleteMultipartUploadCommand,
  CreateMultipartUploadCommand,
} from "@aws-sdk/client-s3";
import type { Readable } from "node:stream";
import { Upload } from "@aws-sdk/lib-storage";
import { storage, storageForLargeUploads } from "./client";

/**
 * Large uploads go in parts: the server starts the upload, the browser PUTs each part to a
 * presigned URL (see presignUploadPart) and reports the parts' ETags, and the server completes it.
 */
export async function createMultipartUpload(request: {
  key: string;
  contentType?: string;
}): Promise<string> {
  const { client, bucket } = storage();
  const result = await client.send(
    new CreateMultipartUploadCommand({
      Bucket: bucket,
      Key: request.key,
      ContentType: request.contentType,
    }),
  );
  if (!result.UploadId) throw new Error(`storage returned no upload id for ${request.key}`);
  return result.UploadId;
}

export interface UploadedPart {
  partNumber: number;
  etag: string;
}

export async function completeMultipartUpload(request: {
  key: string;
  uploadId: string;
  parts: UploadedPart[];
}): Promise<{ etag: string | undefined }> {
  const { client, bucket } = storage();
  // S3 requires the parts in ascending order.
  const parts = [...request.parts]
    .sort((a, b) => a.partNumber - b.partNumber)
    .map((part) => ({ PartNumber: part.partNumber, ETag: part.etag }));
  const result = await client.send(
    new CompleteMultipartUploadCommand({
      Bucket: bucket,
      Key: request.key,
      UploadId: request.uploadId,
      MultipartUpload: { Parts: parts },
    }),
  );
  return { etag: result.ETag };
}

/** Drops a multipart upload and the parts stored so far (a cancelled or failed browser upload). */
export async function abortMultipartUpload(request: {
  key: string;
  uploadId: string;
}): Promise<void> {
  const { client, bucket } = storage();
  await client.send(
    new AbortMultipartUploadCommand({
      Bucket: bucket,
      Key: request.key,
      UploadId: request.uploadId,
    }),
  );
}

/**
 * Stores a stream of unknown length (a file decompressed on the way, say) as one object, in parts
 * uploaded as the stream fills them: a single PUT needs the length first and takes at most 5 GB.
 * A failed or aborted upload drops the parts stored so far.
 */
export async function putObjectFromStream(request: {
  key: string;
  body: Readable;
  contentType?: string;
  signal?: AbortSignal;
}): Promise<void> {
  const { client, bucket } = storageForLargeUploads();
  const upload = new Upload({
    client,
    params: {
      Bucket: bucket,
      Key: request.key,
      Body: request.body,
      ContentType: request.contentType,
    },
    // 16 MB parts, two in flight: about 32 MB of memory, and 10 000 parts reach 160 GB.
    partSize: 16 * 1024 * 1024,
    queueSize: 2,
    leavePartsOnError: false,
  });
  const abort = () => void upload.abort();
  request.signal?.addEventListener("abort", abort, { once: true });
  try {
    request.signal?.throwIfAborted();
    await upload.done();
  } finally {
    request.signal?.removeEventListener("abort", abort);
  }
}
