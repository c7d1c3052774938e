import { createHash } from "node:crypto";
import { Readable } from "node:stream";
import type { ReportInput } from "@/db/schema/analyses";
import { getObjectStream } from "@/lib/storage";

/** A registered file as the analysis reads it from storage. */
export type StoredFile = Omit<ReportInput, "sha256">;

export interface HashedObject {
  /** The object's bytes, fetched from storage on the first read. */
  stream: Readable;
  /** Size and SHA-256 of the bytes that went through `stream`; only once it was read to the end. */
  describe(): ReportInput;
}

/**
 * Streams an object from storage while hashing it: every chunk the engine reads has gone through
 * the hash first, so the SHA-256 and size recorded in the report are those of exactly the bytes
 * analysed, without a second download. The request is made on the first read, so a dataset waiting
 * while its partition map is read holds no idle connection open.
 */
export function openHashedObject(file: StoredFile): HashedObject {
  const hash = createHash("sha256");
  let bytesRead = 0;
  let complete = false;

  async function* readChunks(): AsyncGenerator<Buffer> {
    const object = await getObjectStream(file.objectKey);
    for await (const chunk of object.body as AsyncIterable<Buffer>) {
      hash.update(chunk);
      bytesRead += chunk.length;
      yield chunk;
    }
    // A connection cut short can look like a normal end; the length the server announced cannot.
    if (bytesRead !== object.contentLength) {
      throw new Error(
        `object ${file.objectKey} ended after ${bytesRead} of ${object.contentLength} bytes`,
      );
    }
    complete = true;
  }

  return {
    stream: Readable.from(readChunks(), { objectMode: false }),
    describe() {
      if (!complete) throw new Error(`object ${file.objectKey} was not read to the end`);
      return {
        kind: file.kind,
        name: file.name,
        objectKey: file.objectKey,
        sizeBytes: bytesRead,
        sha256: hash.copy().digest("hex"),
      };
    },
  };
}
