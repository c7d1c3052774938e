import { S3Client } from "@aws-sdk/client-s3";
import { env, type Environment } from "@/lib/env";

export interface StorageTarget {
  client: S3Client;
  bucket: string;
}

type StorageSettings = Pick<
  Environment,
  | "S3_ENDPOINT"
  | "S3_REGION"
  | "S3_BUCKET"
  | "S3_ACCESS_KEY_ID"
  | "S3_SECRET_ACCESS_KEY"
  | "S3_FORCE_PATH_STYLE"
  | "STORAGE_TIMEOUT_MS"
>;

/**
 * An S3 client built from configuration only: with S3_ENDPOINT unset it talks to AWS itself.
 * Checksums are computed only when an operation requires them; with the SDK's default a streamed
 * body is stored by S3-compatible servers with its chunk framing inside the object, and presigned
 * URLs would carry the checksum of an empty body.
 *
 * Every call has a deadline: connecting, and each wait for the next bytes, may take at most
 * STORAGE_TIMEOUT_MS, and a timed-out call is tried once more (the SDK's backoff between), so a
 * frozen storage server costs a caller about two timeouts instead of hanging it. The wait is on
 * idleness, not on the whole transfer, so a large object that keeps flowing is never cut off.
 */
export function createStorageTarget(settings: StorageSettings): StorageTarget {
  const client = new S3Client({
    region: settings.S3_REGION,
    endpoint: settings.S3_ENDPOINT,
    forcePathStyle: settings.S3_FORCE_PATH_STYLE,
    credentials: {
      accessKeyId: settings.S3_ACCESS_KEY_ID,
      secretAccessKey: settings.S3_SECRET_ACCESS_KEY,
    },
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
    maxAttempts: 2,
    requestHandler: {
      connectionTimeout: settings.STORAGE_TIMEOUT_MS,
      socketTimeout: settings.STORAGE_TIMEOUT_MS,
    },
  });
  return { client, bucket: settings.S3_BUCKET };
}

let cached: StorageTarget | undefined;

/** The storage target of this process's configuration, created on first use. */
export function storage(): StorageTarget {
  cached ??= createStorageTarget(env());
  return cached;
}
