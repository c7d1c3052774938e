// Runs against the S3 fake (s3rver) that scripts/test.ts starts and names in S3_ENDPOINT. The
// expected bytes are the bytes we sent: storage must hand back exactly what it was given.
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { Readable } from "node:stream";
import { buffer } from "node:stream/consumers";
import { describe, expect, it } from "vitest";
import {
  completeMultipartUpload,
  createMultipartUpload,
  deleteObject,
  getObjectRange,
  getObjectStream,
  headObject,
  presignPut,
  presignUploadPart,
  putObject,
} from "@/lib/storage";

const sha256 = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");
const uniqueKey = (name: string) => `tests/${randomUUID()}/${name}`;

async function readWhole(key: string): Promise<Buffer> {
  const object = await getObjectStream(key);
  return buffer(object.body);
}

describe("lib/storage against the S3 fake", () => {
  it("returns the exact bytes of a put, with its type", async () => {
    const key = uniqueKey("layout.csv");
    const body = randomBytes(200_000);
    await putObject({ key, body, contentType: "text/csv" });
    const object = await getObjectStream(key);
    expect(object.contentType).toBe("text/csv");
    expect(object.contentLength).toBe(body.length);
    expect(sha256(await buffer(object.body))).toBe(sha256(body));
  });

  it("stores a streamed body without chunk framing or a checksum trailer", async () => {
    // With the SDK's default checksum setting the fake keeps aws-chunked framing inside the
    // object, so the stored size and content would differ from what was sent (stack.md pitfall).
    const key = uniqueKey("streamed.bin");
    const body = randomBytes(70_000);
    await putObject({ key, body: Readable.from([body]), contentLength: body.length });
    const stored = await readWhole(key);
    expect(stored.length).toBe(body.length);
    expect(stored.equals(body)).toBe(true);
  });

  it("reads a byte range, cut at the end of the object", async () => {
    const key = uniqueKey("range.txt");
    const text = "shard,label\n".repeat(100);
    await putObject({ key, body: text, contentType: "text/plain" });
    expect((await getObjectRange(key, 0, 11)).toString()).toBe("shard,label\n");
    expect((await getObjectRange(key, 6, 10)).toString()).toBe("label");
    const tail = await getObjectRange(key, text.length - 6, text.length + 1000);
    expect(tail.toString()).toBe("label\n");
    expect((await getObjectRange(key, 5, 4)).length).toBe(0);
    await expect(getObjectRange(key, -1, 4)).rejects.toThrow(RangeError);
  });

  it("heads an object, and reports a missing one as undefined", async () => {
    const key = uniqueKey("head.json");
    await putObject({ key, body: '{"a":1}', contentType: "application/json" });
    const details = await headObject(key);
    expect(details).toMatchObject({ contentLength: 7, contentType: "application/json" });
    expect(details?.etag).toMatch(/^"[0-9a-f]{32}"$/);
    expect(await headObject(uniqueKey("missing"))).toBeUndefined();
  });

  it("deletes an object", async () => {
    const key = uniqueKey("gone.txt");
    await putObject({ key, body: "x" });
    await deleteObject(key);
    expect(await headObject(key)).toBeUndefined();
  });

  it("accepts a PUT to a presigned URL, as a browser makes it", async () => {
    const key = uniqueKey("presigned.csv");
    const url = await presignPut({ key, contentType: "text/csv", expiresInSeconds: 60 });
    // A checksum parameter in the URL would be the checksum of an empty body (stack.md pitfall).
    expect(new URL(url).searchParams.has("x-amz-sdk-checksum-algorithm")).toBe(false);
    const body = randomBytes(50_000);
    const response = await fetch(url, {
      method: "PUT",
      body,
      headers: { "content-type": "text/csv" },
    });
    expect(response.status).toBe(200);
    expect(response.headers.get("etag")).toBe(`"${createHash("md5").update(body).digest("hex")}"`);
    expect(sha256(await readWhole(key))).toBe(sha256(body));
  });

  it("signs a URL for one key and a few minutes only", async () => {
    // The fake refuses a URL altered to grant more (tests/fakes/s3.test.ts); here, what is granted.
    const key = uniqueKey("granted.csv");
    const url = new URL(await presignPut({ key }));
    expect(decodeURIComponent(url.pathname)).toMatch(new RegExp(`/${key}$`));
    expect(url.searchParams.get("X-Amz-Expires")).toBe("300");
    const shorter = new URL(await presignPut({ key, expiresInSeconds: 30 }));
    expect(shorter.searchParams.get("X-Amz-Expires")).toBe("30");
  });

  it("lets the app's origin upload across origins and read the ETag (CORS)", async () => {
    const origin = process.env.NEXTAUTH_URL ?? "";
    const url = await presignPut({ key: uniqueKey("cors.csv"), contentType: "text/csv" });
    const preflight = await fetch(url, {
      method: "OPTIONS",
      headers: {
        origin,
        "access-control-request-method": "PUT",
        "access-control-request-headers": "content-type",
      },
    });
    expect(preflight.status).toBe(200);
    expect(preflight.headers.get("access-control-allow-methods")).toContain("PUT");
    const upload = await fetch(url, {
      method: "PUT",
      body: "a,b\n",
      headers: { origin, "content-type": "text/csv" },
    });
    expect(upload.headers.get("access-control-allow-origin")).toBe(origin);
    expect(upload.headers.get("access-control-expose-headers")).toContain("ETag");
  });

  it("assembles a multipart upload from parts PUT to presigned URLs", async () => {
    const key = uniqueKey("large.csv");
    // S3 requires every part but the last to be at least 5 MiB.
    const parts = [randomBytes(5 * 1024 * 1024), randomBytes(1234)];
    const uploadId = await createMultipartUpload({ key, contentType: "text/csv" });
    const uploaded = await Promise.all(
      parts.map(async (body, index) => {
        const partNumber = index + 1;
        const url = await presignUploadPart({ key, uploadId, partNumber });
        const response = await fetch(url, { method: "PUT", body });
        expect(response.status).toBe(200);
        return { partNumber, etag: response.headers.get("etag") ?? "" };
      }),
    );
    await completeMultipartUpload({ key, uploadId, parts: uploaded.reverse() });
    expect(sha256(await readWhole(key))).toBe(sha256(Buffer.concat(parts)));
    await expect(presignUploadPart({ key, uploadId, partNumber: 0 })).rejects.toThrow(RangeError);
  });
});
