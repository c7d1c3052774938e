import {
  AbortMultipartUploadCommand,
  CompleteMultipartUploadCommand,
  CreateMultipartUploadCommand,
} from "@aws-sdk/client-s3";
import { storage } from "./client";

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
