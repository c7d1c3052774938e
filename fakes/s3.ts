import { mkdirSync } from "node:fs";
import S3rver from "s3rver";

/** The only key pair s3rver accepts; signatures are checked against it. */
export const fakeS3Credentials = { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" } as const;

export interface FakeS3Options {
  port: number;
  /** Where objects are kept; reused across starts. */
  directory: string;
  bucket: string;
  /** Browser origins allowed to PUT/GET with presigned URLs (the app's own origin). */
  allowedOrigins: string[];
}

export interface RunningFakeS3 {
  /** Base URL to give the S3 SDK as its endpoint (path-style addressing). */
  endpoint: string;
  stop(): Promise<void>;
}

/**
 * A local stand-in for S3 on 127.0.0.1. The bucket gets a CORS rule for the app's origin that
 * exposes ETag, which a browser needs to finish a multipart upload and to confirm a PUT.
 */
export async function startFakeS3(options: FakeS3Options): Promise<RunningFakeS3> {
  mkdirSync(options.directory, { recursive: true });
  const server = new S3rver({
    address: "127.0.0.1",
    port: options.port,
    directory: options.directory,
    silent: true,
    configureBuckets: [
      { name: options.bucket, configs: [corsConfiguration(options.allowedOrigins)] },
    ],
  });
  const address = await server.run();
  return {
    endpoint: `http://127.0.0.1:${address.port}`,
    stop: () => server.close(),
  };
}

function corsConfiguration(origins: string[]): string {
  const allowedOrigins = origins.map((origin) => `<AllowedOrigin>${origin}</AllowedOrigin>`);
  return [
    "<CORSConfiguration><CORSRule>",
    ...allowedOrigins,
    ...["GET", "HEAD", "PUT", "POST"].map((method) => `<AllowedMethod>${method}</AllowedMethod>`),
    "<AllowedHeader>*</AllowedHeader>",
    "<ExposeHeader>ETag</ExposeHeader>",
    "<MaxAgeSeconds>3000</MaxAgeSeconds>",
    "</CORSRule></CORSConfiguration>",
  ].join("");
}
