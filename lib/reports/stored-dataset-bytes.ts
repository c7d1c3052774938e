import { Readable } from "node:stream";
import type { DatasetBytes } from "@/lib/analysis";
import { getObjectRange, getObjectRangeStream } from "@/lib/storage";
import type { StoredFile } from "./hashed-object";

/**
 * A stored dataset read by byte ranges: the coordinator finds the parts' cuts with a few small
 * reads, and each part's worker fetches only its own bytes (and the header's).
 */
export function storedDatasetBytes(file: StoredFile): DatasetBytes {
  return {
    size: file.sizeBytes,
    read: (position, length) => getObjectRange(file.objectKey, position, position + length - 1),
    stream: (start, end) =>
      Readable.from(
        (async function* () {
          yield* await getObjectRangeStream(file.objectKey, start, end);
        })(),
      ),
  };
}
