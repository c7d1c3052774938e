import type { Readable } from "node:stream";
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3ServiceException,
} from "@aws-sdk/client-s3";
import { storage } from "./client";

export interface PutObjectRequest {
  key: string;
  /** A stream needs `contentLength`: S3 accepts no body of unknown length in one PUT. */
  body: Uint8Array | string | Readable;
  contentLength?: number;
  contentType?: string;
}

export interface ObjectDetails {
  contentLength: number;
  contentType: string | undefined;
  etag: string | undefined;
  lastModified: Date | undefined;
}

export interface ObjectStream extends ObjectDetails {
  body: Readable;
}

export async function putObject(request: PutObjectRequest): Promise<{ etag: string | undefined }> {
  const { client, bucket } = storage();
  const result = await client.send(
    new PutObjectCommand({
      Bucket: bucket,
      Key: request.key,
      Body: request.body,
      ContentLength: request.contentLength,
      ContentType: request.contentType,
    }),
  );
  return { etag: result.ETag };
}

/** The whole object as a Node stream; the caller must consume or destroy it. */
export async function getObjectStream(key: string): Promise<ObjectStream> {
  const { client, bucket } = storage();
  const result = await client.send(new GetObjectCommand({ Bucket: bucket, Key: key }));
  if (!result.Body) throw new Error(`object ${key} has no body`);
  return {
    // In Node the SDK's body is an http.IncomingMessage, a Readable.
    body: result.Body as Readable,
    contentLength: result.ContentLength ?? 0,
    contentType: result.ContentType,
    etag: result.ETag,
    lastModified: result.LastModified,
  };
}

/**
 * Bytes `start` through `endInclusive` (HTTP Range semantics), e.g. the head of a CSV for a
 * preview. A range past the end of the object is cut to the object's length.
 */
export async function getObjectRange(
  key: string,
  start: number,
  endInclusive: number,
): Promise<Buffer> {
  if (!Number.isInteger(start) || !Number.isInteger(endInclusive) || start < 0) {
    throw new RangeError(`invalid byte range ${start}-${endInclusive}`);
  }
  if (endInclusive < start) return Buffer.alloc(0);
  const { client, bucket } = storage();
  const result = await client.send(
    new GetObjectCommand({ Bucket: bucket, Key: key, Range: `bytes=${start}-${endInclusive}` }),
  );
  if (!result.Body) return Buffer.alloc(0);
  return Buffer.from(await result.Body.transformToByteArray());
}

/**
 * Bytes [start, end) of an object as a Node stream (one part of a dataset read by one worker);
 * the caller must consume or destroy it.
 */
export async function getObjectRangeStream(
  key: string,
  start: number,
  end: number,
): Promise<Readable> {
  if (!Number.isInteger(start) || !Number.isInteger(end) || start < 0 || end <= start) {
    throw new RangeError(`invalid byte range [${start}, ${end})`);
  }
  const { client, bucket } = storage();
  const result = await client.send(
    new GetObjectCommand({ Bucket: bucket, Key: key, Range: `bytes=${start}-${end - 1}` }),
  );
  if (!result.Body) throw new Error(`object ${key} has no body`);
  return result.Body as Readable;
}

/** Size, type and ETag of an object, or undefined when there is no such object. */
export async function headObject(key: string): Promise<ObjectDetails | undefined> {
  const { client, bucket } = storage();
  try {
    const result = await client.send(new HeadObjectCommand({ Bucket: bucket, Key: key }));
    return {
      contentLength: result.ContentLength ?? 0,
      contentType: result.ContentType,
      etag: result.ETag,
      lastModified: result.LastModified,
    };
  } catch (error) {
    if (error instanceof S3ServiceException && error.$metadata.httpStatusCode === 404) {
      return undefined;
    }
    throw error;
  }
}

/** Removes an object; removing one that does not exist is not an error (as in S3). */
export async function deleteObject(key: string): Promise<void> {
  const { client, bucket } = storage();
  await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: key }));
}
