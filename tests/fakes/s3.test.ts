// The S3 fake must authorize requests as S3 does, so that tests of storage exercise real
// authorization. What counts as valid is decided by the AWS SDK's own signer (the S3 client and
// @aws-sdk/s3-request-presigner), not by the fake's code: their requests must pass, and any change
// to what they signed, a wrong key, an expired URL or no signature must get S3's 403 error XML,
// and a body other than the one whose SHA-256 was signed S3's 400 (error codes as documented in
// the Amazon S3 API reference, "Error responses").
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import {
  CompleteMultipartUploadCommand,
  CreateMultipartUploadCommand,
  GetObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  UploadPartCommand,
} from "@aws-sdk/client-s3";
import { getSignedUrl } from "@aws-sdk/s3-request-presigner";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fakeS3Credentials, startFakeS3, type RunningFakeS3 } from "@/fakes/s3";

const bucket = "signed-only";
const origin = "http://127.0.0.1:3999";
let fake: RunningFakeS3;
let directory: string;
let client: S3Client;

function clientWith(credentials: { accessKeyId: string; secretAccessKey: string }) {
  return new S3Client({
    region: "us-east-1",
    endpoint: fake.endpoint,
    forcePathStyle: true,
    credentials,
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
  });
}

async function errorCode(response: Response): Promise<string | undefined> {
  return /<Code>([^<]+)<\/Code>/.exec(await response.text())?.[1];
}

/**
 * A client whose requests leave the SDK's signer intact but carry `body` instead of what was signed,
 * as a body altered in transit would arrive (of the signed body's length: the length is signed).
 */
function clientSendingOtherBody(body: string): S3Client {
  const altered = clientWith(fakeS3Credentials);
  altered.middlewareStack.add(
    (next) => async (args) => {
      (args.request as { body?: unknown }).body = body;
      return next(args);
    },
    // The deserialize step runs after signing (finalizeRequest), just before the request is sent.
    { step: "deserialize", name: "swapBodyAfterSigning" },
  );
  return altered;
}

async function readObject(key: string): Promise<string> {
  const result = await client.send(new GetObjectCommand({ Bucket: bucket, Key: key }));
  return (await result.Body?.transformToString()) ?? "";
}

beforeAll(async () => {
  directory = mkdtempSync(path.join(os.tmpdir(), "partita-s3-fake-"));
  fake = await startFakeS3({ port: 0, directory, bucket, allowedOrigins: [origin] });
  client = clientWith(fakeS3Credentials);
});

afterAll(async () => {
  client.destroy();
  await fake.stop();
  rmSync(directory, { recursive: true, force: true });
});

describe("the S3 fake accepts what the SDK signs with its key", () => {
  it("serves header-signed puts, gets and listings, keys with spaces and symbols included", async () => {
    const key = "shards/région 7/a+b (1).csv";
    await client.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: "row,shard\n" }));
    expect(await readObject(key)).toBe("row,shard\n");
    const listing = await client.send(
      new ListObjectsV2Command({ Bucket: bucket, Prefix: "shards/" }),
    );
    expect(listing.Contents?.map((object) => object.Key)).toContain(key);
  });

  it("accepts a presigned PUT and a presigned GET, and a multipart upload's presigned part", async () => {
    const key = "presigned/layout.csv";
    const put = await getSignedUrl(
      client,
      new PutObjectCommand({ Bucket: bucket, Key: key, ContentType: "text/csv" }),
      { expiresIn: 60 },
    );
    const upload = await fetch(put, {
      method: "PUT",
      body: "a,b\n",
      headers: { "content-type": "text/csv", origin },
    });
    expect(upload.status).toBe(200);
    expect(upload.headers.get("access-control-allow-origin")).toBe(origin);
    const get = await getSignedUrl(client, new GetObjectCommand({ Bucket: bucket, Key: key }));
    expect(await (await fetch(get)).text()).toBe("a,b\n");

    const multipartKey = "presigned/parts.csv";
    const { UploadId } = await client.send(
      new CreateMultipartUploadCommand({ Bucket: bucket, Key: multipartKey }),
    );
    const partUrl = await getSignedUrl(
      client,
      new UploadPartCommand({ Bucket: bucket, Key: multipartKey, UploadId, PartNumber: 1 }),
    );
    const part = await fetch(partUrl, { method: "PUT", body: "only part\n" });
    expect(part.status).toBe(200);
    await client.send(
      new CompleteMultipartUploadCommand({
        Bucket: bucket,
        Key: multipartKey,
        UploadId,
        MultipartUpload: { Parts: [{ PartNumber: 1, ETag: part.headers.get("etag") ?? "" }] },
      }),
    );
    expect(await readObject(multipartKey)).toBe("only part\n");
  });

  it("answers a browser's CORS preflight, which carries no signature", async () => {
    const preflight = await fetch(`${fake.endpoint}/${bucket}/any.csv`, {
      method: "OPTIONS",
      headers: {
        origin,
        "access-control-request-method": "PUT",
        "access-control-request-headers": "content-type",
      },
    });
    expect(preflight.status).toBe(200);
  });
});

describe("the S3 fake refuses what S3 would refuse", () => {
  it("refuses unsigned reads, writes and deletes, and leaves the object alone", async () => {
    const key = "private/report.json";
    await client.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: "kept" }));
    const objectUrl = `${fake.endpoint}/${bucket}/${key}`;
    const read = await fetch(objectUrl);
    expect(read.status).toBe(403);
    expect(await errorCode(read)).toBe("AccessDenied");
    const overwrite = await fetch(objectUrl, { method: "PUT", body: "overwritten" });
    expect(overwrite.status).toBe(403);
    const remove = await fetch(objectUrl, { method: "DELETE" });
    expect(remove.status).toBe(403);
    expect(await readObject(key)).toBe("kept");
  });

  it("refuses a presigned URL whose signature, key or expiry was altered", async () => {
    const key = "private/granted.csv";
    const url = new URL(
      await getSignedUrl(client, new PutObjectCommand({ Bucket: bucket, Key: key }), {
        expiresIn: 60,
      }),
    );
    const signature = url.searchParams.get("X-Amz-Signature") ?? "";
    const forged = new URL(url);
    forged.searchParams.set(
      "X-Amz-Signature",
      `${signature.slice(0, -1)}${signature.endsWith("0") ? "1" : "0"}`,
    );
    const otherKey = new URL(url);
    otherKey.pathname = otherKey.pathname.replace("granted.csv", "someone-elses.csv");
    const longer = new URL(url);
    longer.searchParams.set("X-Amz-Expires", "604800");
    for (const attempt of [forged, otherKey, longer]) {
      const response = await fetch(attempt, { method: "PUT", body: "forged" });
      expect(response.status).toBe(403);
      expect(await errorCode(response)).toBe("SignatureDoesNotMatch");
    }
    // The URL as signed works, but only for the method it was signed for.
    expect((await fetch(url, { method: "PUT", body: "genuine" })).status).toBe(200);
    const asDelete = await fetch(url, { method: "DELETE" });
    expect(await errorCode(asDelete)).toBe("SignatureDoesNotMatch");
    expect(await readObject(key)).toBe("genuine");
  });

  it("refuses a presigned URL after it expired", async () => {
    const key = "private/expired.csv";
    // Signed two hours ago for one hour: expired an hour ago, however slow the test machine.
    const url = await getSignedUrl(client, new PutObjectCommand({ Bucket: bucket, Key: key }), {
      expiresIn: 3600,
      signingDate: new Date(Date.now() - 2 * 3600 * 1000),
    });
    const response = await fetch(url, { method: "PUT", body: "late" });
    expect(response.status).toBe(403);
    const body = await response.text();
    expect(body).toContain("<Code>AccessDenied</Code>");
    expect(body).toContain("Request has expired");
  });

  it("refuses requests signed with a wrong secret or an unknown key", async () => {
    const wrongSecret = clientWith({ ...fakeS3Credentials, secretAccessKey: "not-the-secret" });
    const unknownKey = clientWith({ accessKeyId: "SOMEONE", secretAccessKey: "S3RVER" });
    const put = new PutObjectCommand({ Bucket: bucket, Key: "private/x", Body: "x" });
    await expect(wrongSecret.send(put)).rejects.toMatchObject({
      name: "SignatureDoesNotMatch",
      $metadata: { httpStatusCode: 403 },
    });
    await expect(unknownKey.send(put)).rejects.toMatchObject({
      name: "InvalidAccessKeyId",
      $metadata: { httpStatusCode: 403 },
    });
    wrongSecret.destroy();
    unknownKey.destroy();
  });

  it("refuses a signed request sent under a host name other than the one it signed", async () => {
    const key = "private/tampered.csv";
    const url = await getSignedUrl(client, new GetObjectCommand({ Bucket: bucket, Key: key }));
    const signedHost = new URL(url).host;
    // Presigned URLs sign the Host header; the same URL sent to another name of the server fails.
    const response = await fetch(url.replace(signedHost, `localhost:${new URL(url).port}`));
    expect(await errorCode(response)).toBe("SignatureDoesNotMatch");
  });

  it("refuses a put or a part whose body is not the one whose SHA-256 was signed, storing nothing", async () => {
    const key = "private/checked.csv";
    await client.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: "genuine\n" }));
    const altered = clientSendingOtherBody("altered\n");
    await expect(
      altered.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: "genuine\n" })),
    ).rejects.toMatchObject({
      name: "XAmzContentSHA256Mismatch",
      $metadata: { httpStatusCode: 400 },
    });
    expect(await readObject(key)).toBe("genuine\n");

    const multipartKey = "private/checked-parts.csv";
    const { UploadId } = await client.send(
      new CreateMultipartUploadCommand({ Bucket: bucket, Key: multipartKey }),
    );
    const part = { Bucket: bucket, Key: multipartKey, UploadId, PartNumber: 1, Body: "part 1\n\n" };
    await expect(altered.send(new UploadPartCommand(part))).rejects.toMatchObject({
      name: "XAmzContentSHA256Mismatch",
      $metadata: { httpStatusCode: 400 },
    });
    // The same part with the body it was signed for is stored.
    const { ETag } = await client.send(new UploadPartCommand(part));
    await client.send(
      new CompleteMultipartUploadCommand({
        Bucket: bucket,
        Key: multipartKey,
        UploadId,
        MultipartUpload: { Parts: [{ PartNumber: 1, ETag }] },
      }),
    );
    expect(await readObject(multipartKey)).toBe("part 1\n\n");
    altered.destroy();
  });
});
