import { PutObjectCommand, UploadPartCommand } from "@aws-sdk/client-s3";
import { getSignedUrl } from "@aws-sdk/s3-request-presigner";
import { storage } from "./client";

/** Long enough to start an upload from a slow connection, short enough to be useless if leaked. */
const defaultExpirySeconds = 300;

export interface PresignPutRequest {
  key: string;
  /** When given, the browser must send exactly this Content-Type. */
  contentType?: string;
  expiresInSeconds?: number;
}

/** A URL that lets its holder PUT one object under one key, for a few minutes. */
export async function presignPut(request: PresignPutRequest): Promise<string> {
  const { client, bucket } = storage();
  return getSignedUrl(
    client,
    new PutObjectCommand({ Bucket: bucket, Key: request.key, ContentType: request.contentType }),
    { expiresIn: request.expiresInSeconds ?? defaultExpirySeconds },
  );
}

export interface PresignUploadPartRequest {
  key: string;
  uploadId: string;
  /** 1 to 10,000, as S3 numbers parts. */
  partNumber: number;
  expiresInSeconds?: number;
}

/** A URL that lets its holder PUT one part of a multipart upload. */
export async function presignUploadPart(request: PresignUploadPartRequest): Promise<string> {
  if (
    !Number.isInteger(request.partNumber) ||
    request.partNumber < 1 ||
    request.partNumber > 10_000
  ) {
    throw new RangeError(
      `part number must be an integer from 1 to 10000, got ${request.partNumber}`,
    );
  }
  const { client, bucket } = storage();
  return getSignedUrl(
    client,
    new UploadPartCommand({
      Bucket: bucket,
      Key: request.key,
      UploadId: request.uploadId,
      PartNumber: request.partNumber,
    }),
    { expiresIn: request.expiresInSeconds ?? defaultExpirySeconds },
  );
}
