import { createHash, createHmac, timingSafeEqual, type Hash, type Hmac } from "node:crypto";
import type { IncomingHttpHeaders } from "node:http";
import { SignatureV4 } from "@smithy/signature-v4";

/**
 * Signature Version 4 checks as S3 makes them, for the local S3 fake (s3rver verifies no V4
 * signature at all). The signature is recomputed with the AWS SDK's own signer from the fake's one
 * key pair, so a request passes exactly when the SDK (or a browser holding a presigned URL made by
 * it) signed it with that key and it has not expired.
 */
export interface Credentials {
  accessKeyId: string;
  secretAccessKey: string;
}

export interface SignedRequest {
  method: string;
  /** The request target as received: path and query, still percent-encoded. */
  url: string;
  headers: IncomingHttpHeaders;
}

/** Why S3 would refuse a request: its error code and message (all are answered with 403). */
export interface Refusal {
  code: string;
  message: string;
}

/** S3 refuses a header-signed request whose x-amz-date is further than this from its clock. */
const allowedClockSkewMs = 15 * 60 * 1000;
/** The longest validity S3 accepts for a presigned URL: seven days. */
const longestPresignedSeconds = 7 * 24 * 60 * 60;
const algorithm = "AWS4-HMAC-SHA256";
const unsignedPayload = "UNSIGNED-PAYLOAD";

/** Checks a request's signature; undefined when S3 would accept it, else the refusal. */
export async function verifyS3Signature(
  request: SignedRequest,
  credentials: Credentials,
  now: Date = new Date(),
): Promise<Refusal | undefined> {
  const { path, query } = splitTarget(request.url);
  if (typeof request.headers.authorization === "string") {
    return verifyHeaderSignature(request, path, query, credentials, now);
  }
  if (query.has("X-Amz-Algorithm")) {
    return verifyPresignedUrl(request, path, query, credentials, now);
  }
  return { code: "AccessDenied", message: "Access Denied" };
}

async function verifyHeaderSignature(
  request: SignedRequest,
  path: string,
  query: URLSearchParams,
  credentials: Credentials,
  now: Date,
): Promise<Refusal | undefined> {
  const match =
    /^AWS4-HMAC-SHA256 Credential=([^,\s]+),\s*SignedHeaders=([^,\s]+),\s*Signature=([0-9a-f]{64})$/.exec(
      String(request.headers.authorization),
    );
  if (!match) {
    return {
      code: "AuthorizationHeaderMalformed",
      message: "The authorization header is malformed; only AWS4-HMAC-SHA256 is accepted.",
    };
  }
  const [, credential, signedHeaderList, signature] = match;
  const scope = parseScope(credential, credentials);
  if ("code" in scope) return scope;
  const signedHeaders = signedHeaderList.split(";");
  const signingDate = parseAmzDate(headerValue(request.headers["x-amz-date"]));
  if (!signingDate || !signedHeaders.includes("x-amz-date")) {
    return {
      code: "AccessDenied",
      message: "AWS authentication requires a valid signed x-amz-date.",
    };
  }
  if (!signedHeaders.includes("x-amz-content-sha256")) {
    return {
      code: "InvalidRequest",
      message: "Missing required header for this request: x-amz-content-sha256",
    };
  }
  if (Math.abs(now.getTime() - signingDate.getTime()) > allowedClockSkewMs) {
    return {
      code: "RequestTimeTooSkewed",
      message: "The difference between the request time and the current time is too large.",
    };
  }
  const signer = createSigner(credentials, scope.region);
  const signed = await signer.sign(
    {
      method: request.method,
      protocol: "http:",
      hostname: "",
      path,
      query: queryRecord(query),
      headers: pickHeaders(request.headers, signedHeaders),
    },
    { signingDate, signableHeaders: new Set(signedHeaders) },
  );
  const expected = /Signature=([0-9a-f]{64})$/.exec(String(signed.headers.authorization))?.[1];
  return sameSignature(expected, signature) ? undefined : signatureMismatch();
}

async function verifyPresignedUrl(
  request: SignedRequest,
  path: string,
  query: URLSearchParams,
  credentials: Credentials,
  now: Date,
): Promise<Refusal | undefined> {
  if (query.get("X-Amz-Algorithm") !== algorithm) {
    return queryParametersError("X-Amz-Algorithm only supports AWS4-HMAC-SHA256.");
  }
  const credential = query.get("X-Amz-Credential");
  const signature = query.get("X-Amz-Signature");
  const signingDate = parseAmzDate(query.get("X-Amz-Date") ?? undefined);
  const expiresIn = Number(query.get("X-Amz-Expires"));
  const signedHeaderList = query.get("X-Amz-SignedHeaders");
  if (!credential || !signature || !signingDate || !signedHeaderList) {
    return queryParametersError(
      "Query-string authentication version 4 requires the X-Amz-Algorithm, X-Amz-Credential, " +
        "X-Amz-Signature, X-Amz-Date, X-Amz-SignedHeaders, and X-Amz-Expires parameters.",
    );
  }
  if (!Number.isInteger(expiresIn) || expiresIn < 1 || expiresIn > longestPresignedSeconds) {
    return queryParametersError("X-Amz-Expires must be a whole number of seconds up to 604800.");
  }
  const scope = parseScope(credential, credentials);
  if ("code" in scope) return scope;
  if (now.getTime() < signingDate.getTime() - allowedClockSkewMs) {
    return { code: "AccessDenied", message: "Request is not valid yet" };
  }
  if (now.getTime() > signingDate.getTime() + expiresIn * 1000) {
    return { code: "AccessDenied", message: "Request has expired" };
  }
  const signedHeaders = signedHeaderList.split(";");
  const headers = pickHeaders(request.headers, signedHeaders);
  // A presigned URL always signs an unsigned payload; the signer reads that from this header,
  // which must neither be signed nor moved into the query unless the URL itself did so.
  const payloadHeaderSigned = signedHeaders.includes("x-amz-content-sha256");
  if (!payloadHeaderSigned) headers["x-amz-content-sha256"] = unsignedPayload;
  const unsigned = payloadHeaderSigned ? new Set<string>() : new Set(["x-amz-content-sha256"]);
  const rest = new URLSearchParams(query);
  rest.delete("X-Amz-Signature");
  const signer = createSigner(credentials, scope.region);
  const presigned = await signer.presign(
    {
      method: request.method,
      protocol: "http:",
      hostname: "",
      path,
      query: queryRecord(rest),
      headers,
    },
    {
      signingDate,
      expiresIn,
      signableHeaders: new Set(signedHeaders),
      unsignableHeaders: unsigned,
      unhoistableHeaders: new Set(Object.keys(headers)),
    },
  );
  const expected = presigned.query?.["X-Amz-Signature"];
  return sameSignature(typeof expected === "string" ? expected : undefined, signature)
    ? undefined
    : signatureMismatch();
}

/** `AKID/20261205/us-east-1/s3/aws4_request`: the key must be the fake's, the service S3. */
function parseScope(credential: string, credentials: Credentials): Refusal | { region: string } {
  const [accessKeyId, , region, service, terminator] = credential.split("/");
  if (accessKeyId !== credentials.accessKeyId) {
    return {
      code: "InvalidAccessKeyId",
      message: "The AWS Access Key Id you provided does not exist in our records.",
    };
  }
  if (!region || service !== "s3" || terminator !== "aws4_request") {
    return {
      code: "AuthorizationHeaderMalformed",
      message: `The credential scope ${credential.split("/").slice(1).join("/")} is malformed.`,
    };
  }
  return { region };
}

function createSigner(credentials: Credentials, region: string): SignatureV4 {
  // S3 signs the path as sent (no second round of encoding) and carries the payload hash itself.
  return new SignatureV4({
    credentials,
    region,
    service: "s3",
    sha256: NodeSha256,
    uriEscapePath: false,
    applyChecksum: false,
  });
}

/** The SDK's checksum interface over node:crypto: a plain hash, or an HMAC when given a key. */
class NodeSha256 {
  private readonly hash: Hash | Hmac;
  constructor(secret?: string | ArrayBuffer | ArrayBufferView) {
    this.hash = secret === undefined ? createHash("sha256") : createHmac("sha256", toBytes(secret));
  }
  update(data: Uint8Array) {
    this.hash.update(data);
  }
  async digest(): Promise<Uint8Array> {
    return new Uint8Array(this.hash.digest());
  }
}

function toBytes(data: string | ArrayBuffer | ArrayBufferView): string | Uint8Array {
  if (typeof data === "string") return data;
  if (ArrayBuffer.isView(data))
    return new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
  return new Uint8Array(data);
}

function splitTarget(url: string): { path: string; query: URLSearchParams } {
  const queryStart = url.indexOf("?");
  if (queryStart < 0) return { path: url, query: new URLSearchParams() };
  return {
    path: url.slice(0, queryStart),
    // '+' means a plus sign here, not a space: the SDK encodes spaces as %20.
    query: new URLSearchParams(url.slice(queryStart + 1).replace(/\+/g, "%2B")),
  };
}

function queryRecord(query: URLSearchParams): Record<string, string | string[]> {
  const record: Record<string, string | string[]> = {};
  for (const key of new Set(query.keys())) {
    const values = query.getAll(key);
    record[key] = values.length === 1 ? values[0] : values;
  }
  return record;
}

function pickHeaders(headers: IncomingHttpHeaders, names: string[]): Record<string, string> {
  const picked: Record<string, string> = {};
  for (const name of names) {
    const value = headerValue(headers[name]);
    if (value !== undefined) picked[name] = value;
  }
  return picked;
}

function headerValue(value: string | string[] | undefined): string | undefined {
  return Array.isArray(value) ? value.join(",") : value;
}

/** `20261205T033000Z` → Date, or undefined when it is not in that form. */
function parseAmzDate(value: string | undefined): Date | undefined {
  const match = value ? /^(\d{4})(\d{2})(\d{2})T(\d{2})(\d{2})(\d{2})Z$/.exec(value) : null;
  if (!match) return undefined;
  const [, year, month, day, hour, minute, second] = match.map(Number);
  return new Date(Date.UTC(year, month - 1, day, hour, minute, second));
}

function sameSignature(expected: string | undefined, provided: string): boolean {
  if (!expected || expected.length !== provided.length) return false;
  return timingSafeEqual(Buffer.from(expected), Buffer.from(provided));
}

function signatureMismatch(): Refusal {
  return {
    code: "SignatureDoesNotMatch",
    message:
      "The request signature we calculated does not match the signature you provided. " +
      "Check your key and signing method.",
  };
}

function queryParametersError(message: string): Refusal {
  return { code: "AuthorizationQueryParametersError", message };
}
