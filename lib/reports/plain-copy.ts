import { pipeline } from "node:stream/promises";
import { Transform } from "node:stream";
import { createGunzip } from "node:zlib";
import { workspacePrefix } from "@/lib/uploads/file-rules";
import { deleteObject, getObjectStream, putObjectFromStream } from "@/lib/storage";
import type { StoredFile } from "./hashed-object";

/**
 * The plain CSV a gzip dataset holds, stored beside it for one analysis in parts: compressed data
 * reads only from its start, so the coordinator decompresses the file once, and each part's worker
 * then reads its own byte range of the copy as of any CSV. The copy has the file's lines byte for
 * byte, so the parts' rows, row numbers and messages (which name the dataset, not the copy) are
 * those of a one-process read of the gzip file.
 */
export interface PlainCopy {
  file: StoredFile;
  remove(): Promise<void>;
}

/** One copy per analysis: a retried coordinator writes over what a stopped one left. */
export function plainCopyKey(workspaceId: string, analysisId: string): string {
  return `${workspacePrefix(workspaceId)}analyses/${analysisId}/plain-copy.csv`;
}

/**
 * Decompresses the stored gzip dataset into its plain copy, streaming (memory stays at the
 * upload's few parts). `onProgress` gets the fraction of the compressed bytes read. Resolves null
 * when the data cannot be decompressed: the one-process read reports that with its own message.
 */
export async function storePlainCopy(
  dataset: StoredFile,
  owner: { workspaceId: string; analysisId: string },
  hooks: { signal: AbortSignal; onProgress(fraction: number): void },
): Promise<PlainCopy | null> {
  const key = plainCopyKey(owner.workspaceId, owner.analysisId);
  const remove = () => deleteObject(key);
  let compressedBytes = 0;
  let plainBytes = 0;
  const countCompressed = counter((length) => {
    compressedBytes += length;
    hooks.onProgress(compressedBytes / Math.max(dataset.sizeBytes, 1));
  });
  const plain = counter((length) => (plainBytes += length));
  let decompressionFailed = false;
  const gunzip = createGunzip().once("error", () => (decompressionFailed = true));
  // Either side failing stops the other: a failed upload would otherwise leave the read waiting.
  const stop = new AbortController();
  const signal = AbortSignal.any([hooks.signal, stop.signal]);
  const compressed = await getObjectStream(dataset.objectKey);
  const reading = pipeline(compressed.body, countCompressed, gunzip, plain, { signal });
  const uploading = putObjectFromStream({ key, body: plain, contentType: "text/csv", signal });
  try {
    await Promise.all([reading, uploading]);
  } catch (error) {
    stop.abort();
    await Promise.allSettled([reading, uploading]);
    await remove().catch(() => undefined);
    if (decompressionFailed && !hooks.signal.aborted) return null;
    throw error;
  }
  return {
    file: { kind: dataset.kind, name: dataset.name, objectKey: key, sizeBytes: plainBytes },
    remove,
  };
}

/** A stream that passes its bytes on and tells `count` how many went through. */
function counter(count: (length: number) => void): Transform {
  return new Transform({
    transform(chunk: Buffer, _encoding, done) {
      count(chunk.length);
      done(null, chunk);
    },
  });
}
