import "server-only";
import type { DataFilePreview } from "@/db/schema/analyses";
import { AnalysisInputError, quoteValue, type CsvFormatChoice } from "@/lib/analysis/browser";
import { RuleError } from "@/lib/errors";
import { deleteObject, getObjectRange, headObject } from "@/lib/storage";
import { findUploadProblem, formatBytes, type DataFileKind } from "./file-rules";
import {
  checkDatasetHeader,
  checkLayoutHeader,
  inspectWeights,
  WEIGHTS_MAX_BYTES,
} from "./inspect-upload";
import { readTableHead, summarizeTableHead } from "./table-preview";

export interface StoredUpload {
  sizeBytes: number;
  contentType: string | null;
  preview: DataFilePreview;
}

/**
 * Looks at an object the browser says it uploaded: it must exist and be non-empty and within the
 * size limit (HEAD), and its beginning must be a CSV of the right shape or, for weights, the whole
 * file valid weights JSON. Only a ranged read is made, so a large dataset is never downloaded.
 * Problems are RuleErrors on the field "file" with a message naming the file.
 */
export async function inspectStoredUpload(request: {
  key: string;
  name: string;
  kind: DataFileKind;
  maxBytes: number;
}): Promise<StoredUpload> {
  const { key, name, kind, maxBytes } = request;
  const details = await headObject(key);
  if (!details) {
    throw new RuleError(
      404,
      `${quoteValue(name)} has not arrived in storage. Please upload it again.`,
      "file",
    );
  }
  // The browser checked these before uploading; a client that skipped the checks meets them here.
  const problem = findUploadProblem(
    { name, size: details.contentLength, contentType: "" },
    kind,
    maxBytes,
  );
  if (problem) {
    if (details.contentLength > maxBytes) await deleteObject(key);
    throw new RuleError(422, problem, "file");
  }
  try {
    return {
      sizeBytes: details.contentLength,
      contentType: details.contentType ?? null,
      preview: await readPreview(key, name, kind, details.contentLength),
    };
  } catch (error) {
    if (error instanceof AnalysisInputError) throw new RuleError(422, error.message, "file");
    throw error;
  }
}

async function readPreview(
  key: string,
  name: string,
  kind: DataFileKind,
  totalBytes: number,
): Promise<DataFilePreview> {
  if (kind === "weights") {
    if (totalBytes > WEIGHTS_MAX_BYTES) {
      throw new AnalysisInputError(`the file is ${formatBytes(totalBytes)}`, {
        file: name,
        expected: `reference weights of at most ${formatBytes(WEIGHTS_MAX_BYTES)}`,
      });
    }
    const bytes = await getObjectRange(key, 0, totalBytes - 1);
    return inspectWeights(new TextDecoder("utf-8").decode(bytes), name);
  }
  // Ranges here are end-exclusive; storage's are end-inclusive.
  const head = await readTableHead(
    (start, end) => getObjectRange(key, start, end - 1),
    totalBytes,
    name,
  );
  if (kind === "dataset") checkDatasetHeader(head.header, name);
  else checkLayoutHeader(head.header, name);
  return summarizeTableHead(head);
}

/**
 * A stored dataset's preview read again in the format the user chose (encoding, delimiter, decimal
 * mark) instead of the detected one, so the form's columns are those the analysis will see. Not
 * stored: the upload's detected preview stays the file's. A format the file cannot be read in is a
 * RuleError with the engine's message naming the file.
 */
export async function previewStoredDataset(
  file: { objectKey: string; name: string; sizeBytes: number },
  choice: CsvFormatChoice,
): Promise<DataFilePreview> {
  try {
    const head = await readTableHead(
      (start, end) => getObjectRange(file.objectKey, start, end - 1),
      file.sizeBytes,
      file.name,
      choice,
    );
    checkDatasetHeader(head.header, file.name);
    return summarizeTableHead(head);
  } catch (error) {
    if (error instanceof AnalysisInputError) {
      throw new RuleError(422, error.message);
    }
    throw error;
  }
}
