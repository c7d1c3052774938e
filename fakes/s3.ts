import { createHash } from "node:crypto";
import { mkdirSync } from "node:fs";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { PassThrough } from "node:stream";
import S3rver from "s3rver";
import { verifyS3Signature, type Credentials, type Refusal } from "./s3-signature";

/** The only key pair the fake accepts; every request's V4 signature is checked against it. */
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
 * A local stand-in for S3 on 127.0.0.1. s3rver stores the objects; in front of it, every request
 * except a CORS preflight must carry a valid Signature Version 4 (an Authorization header or a
 * presigned URL that has not expired) made with `fakeS3Credentials`, or it is refused with a 403
 * and S3's error XML, as a private bucket would refuse it. A PUT (an object or a multipart upload's
 * part) whose signed x-amz-content-sha256 names a SHA-256 is stored only when its body has that
 * hash; otherwise S3's 400 XAmzContentSHA256Mismatch, and nothing is written. The bucket gets a CORS rule for the
 * app's origin that exposes ETag, which a browser needs to finish a multipart upload and to
 * confirm a PUT.
 */
export async function startFakeS3(options: FakeS3Options): Promise<RunningFakeS3> {
  mkdirSync(options.directory, { recursive: true });
  const store = new S3rver({
    directory: options.directory,
    silent: true,
    configureBuckets: [
      { name: options.bucket, configs: [corsConfiguration(options.allowedOrigins)] },
    ],
  });
  await store.configureBuckets();
  const serveStore = store.callback();
  const server = createServer((request, response) => {
    void admit(request, fakeS3Credentials).then(
      async (refusal) => {
        if (refusal) return refuse(request, response, refusal, options.allowedOrigins);
        const declaredHash = declaredPayloadHash(request);
        if (declaredHash === undefined) return serveStore(request, response);
        // The body must be whole before its hash is known, so it is held and then handed on.
        const body = await readBody(request);
        if (createHash("sha256").update(body).digest("hex") !== declaredHash) {
          return refuse(request, response, payloadMismatch, options.allowedOrigins);
        }
        serveStore(replayed(request, body), response);
      },
      (error: unknown) => {
        const message = error instanceof Error ? error.message : String(error);
        refuse(request, response, { code: "InternalError", message }, options.allowedOrigins);
      },
    );
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });
  const { port } = server.address() as AddressInfo;
  return {
    endpoint: `http://127.0.0.1:${port}`,
    stop: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

/** A browser's CORS preflight carries no credentials; S3 answers it from the bucket's CORS rule. */
async function admit(request: IncomingMessage, credentials: Credentials) {
  if (request.method === "OPTIONS") return undefined;
  return verifyS3Signature(
    { method: request.method ?? "GET", url: request.url ?? "/", headers: request.headers },
    credentials,
  );
}

/** S3's answer to a body that is not the one whose hash was signed. */
const payloadMismatch: Refusal = {
  code: "XAmzContentSHA256Mismatch",
  message: "The provided 'x-amz-content-sha256' header does not match what was computed.",
};

/**
 * The SHA-256 a PUT declares for its body, or undefined when there is nothing to check: other
 * methods, UNSIGNED-PAYLOAD (presigned URLs, browsers) and the streaming forms, whose chunks carry
 * signatures of their own.
 */
function declaredPayloadHash(request: IncomingMessage): string | undefined {
  const declared = request.headers["x-amz-content-sha256"];
  if (request.method !== "PUT" || typeof declared !== "string") return undefined;
  return /^[0-9a-f]{64}$/i.test(declared) ? declared.toLowerCase() : undefined;
}

async function readBody(request: IncomingMessage): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of request) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

/** The request again, its body already read: what s3rver reads (method, URL, headers, stream). */
function replayed(request: IncomingMessage, body: Buffer): IncomingMessage {
  const stream = new PassThrough();
  stream.end(body);
  return Object.assign(stream, {
    method: request.method,
    url: request.url,
    headers: request.headers,
    rawHeaders: request.rawHeaders,
    httpVersion: request.httpVersion,
    httpVersionMajor: request.httpVersionMajor,
    httpVersionMinor: request.httpVersionMinor,
    socket: request.socket,
    connection: request.socket,
  }) as unknown as IncomingMessage;
}

function refuse(
  request: IncomingMessage,
  response: ServerResponse,
  refusal: Refusal,
  allowedOrigins: string[],
) {
  // Drain the body a refused upload was sending, so the client reads the answer, not a reset.
  request.resume();
  const status =
    refusal.code === "InternalError" ? 500 : refusal.code === payloadMismatch.code ? 400 : 403;
  const origin = request.headers.origin;
  if (origin && allowedOrigins.includes(origin)) {
    // As S3 does for a matching CORS rule, so a browser can read why it was refused.
    response.setHeader("Access-Control-Allow-Origin", origin);
    response.setHeader("Vary", "Origin");
  }
  response.writeHead(status, { "Content-Type": "application/xml" });
  response.end(
    request.method === "HEAD"
      ? undefined
      : [
          '<?xml version="1.0" encoding="UTF-8"?>',
          `<Error><Code>${refusal.code}</Code><Message>${escapeXml(refusal.message)}</Message></Error>`,
        ].join("\n"),
  );
}

function escapeXml(text: string): string {
  return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
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
