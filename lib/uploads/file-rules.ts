// What Partita accepts as an upload, shared by the browser (checks before any byte is sent) and the
// server (the same checks again, since a browser can be bypassed). No Node or Next.js imports.

import { quoteValue } from "@/lib/analysis/browser";

export const DATA_FILE_KINDS = ["dataset", "layout", "weights"] as const;
export type DataFileKind = (typeof DATA_FILE_KINDS)[number];

/** How each kind is named to users, e.g. in "The partition map is empty". */
export const KIND_LABELS: Record<DataFileKind, string> = {
  dataset: "dataset",
  layout: "partition map",
  weights: "reference weights file",
};

/** One file format a kind accepts, recognised by the end of the file's name. */
interface FileFormat {
  extension: string;
  /**
   * Types browsers report for such files. Windows browsers call a .csv "application/vnd.ms-excel",
   * and many report no type at all (""), so the extension decides and the type only rules out
   * files that are clearly something else (e.g. a spreadsheet renamed to .csv).
   */
  contentTypes: readonly string[];
  /** The type the object is stored with, whatever the browser said. */
  storedContentType: string;
}

interface FormatRule {
  formats: readonly FileFormat[];
  description: string;
}

const CSV_FORMAT: FileFormat = {
  extension: ".csv",
  contentTypes: [
    "",
    "text/csv",
    "text/plain",
    "application/csv",
    "text/x-csv",
    "application/x-csv",
    "text/comma-separated-values",
    "application/vnd.ms-excel",
  ],
  storedContentType: "text/csv",
};

const GZIP_CSV_FORMAT: FileFormat = {
  extension: ".csv.gz",
  contentTypes: ["", "application/gzip", "application/x-gzip", "application/octet-stream"],
  storedContentType: "application/gzip",
};

const PARQUET_FORMAT: FileFormat = {
  extension: ".parquet",
  contentTypes: [
    "",
    "application/vnd.apache.parquet",
    "application/x-parquet",
    "application/octet-stream",
  ],
  storedContentType: "application/vnd.apache.parquet",
};

const TABLE_RULE: FormatRule = {
  formats: [CSV_FORMAT, GZIP_CSV_FORMAT, PARQUET_FORMAT],
  description:
    "a CSV file (.csv, comma- or semicolon-separated text with a header row), the same compressed with gzip (.csv.gz), or a Parquet file (.parquet)",
};

const JSON_RULE: FormatRule = {
  formats: [
    {
      extension: ".json",
      contentTypes: ["", "application/json", "text/json", "text/plain"],
      storedContentType: "application/json",
    },
  ],
  description: "a JSON file (.json)",
};

export const FORMAT_RULES: Record<DataFileKind, FormatRule> = {
  dataset: TABLE_RULE,
  layout: TABLE_RULE,
  weights: JSON_RULE,
};

/** The format of a file of this kind, by its name, or undefined when the kind takes no such file. */
function findFileFormat(name: string, kind: DataFileKind): FileFormat | undefined {
  const lowerName = name.toLowerCase();
  return FORMAT_RULES[kind].formats.find((format) => lowerName.endsWith(format.extension));
}

/** The type a file of this kind and name is sent and stored with (binary when no format matches). */
export function storedContentTypeOf(name: string, kind: DataFileKind): string {
  return findFileFormat(name, kind)?.storedContentType ?? "application/octet-stream";
}

/** Files up to this size go in one presigned PUT; larger ones as a multipart upload. */
export const SINGLE_PUT_MAX_BYTES = 64 * 1024 * 1024;
/** Part size of multipart uploads, grown for very large files to stay within S3's 10,000 parts. */
export const MULTIPART_PART_BYTES = 16 * 1024 * 1024;
const MAX_PARTS = 10_000;

export interface FileDescription {
  name: string;
  size: number;
  contentType: string;
}

/** Bytes in the form people read, e.g. 2 GiB → "2 GB", 1536 → "1.5 KB" (binary multiples). */
export function formatBytes(bytes: number): string {
  const units = ["bytes", "KB", "MB", "GB", "TB"];
  let value = bytes;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit++;
  }
  const rounded = unit === 0 ? String(value) : String(Number(value.toFixed(1)));
  return `${rounded} ${units[unit]}`;
}

function extensionOf(name: string): string {
  const dot = name.lastIndexOf(".");
  return dot < 0 ? "" : name.slice(dot).toLowerCase();
}

/**
 * Why this file cannot be uploaded as this kind, or null when it can: wrong type, empty, or over
 * the size limit. Each message names the file and says what is expected.
 */
export function findUploadProblem(
  file: FileDescription,
  kind: DataFileKind,
  maxBytes: number,
): string | null {
  const rule = FORMAT_RULES[kind];
  const label = KIND_LABELS[kind];
  const contentType = file.contentType.split(";")[0].trim().toLowerCase();
  const format = findFileFormat(file.name, kind);
  if (!format) {
    return `${quoteValue(file.name)} is not ${rule.description}. The ${label} must be ${rule.description}.`;
  }
  if (!format.contentTypes.includes(contentType)) {
    return `${quoteValue(file.name)} is of type ${contentType}, not ${rule.description}. Save it as ${rule.description} and try again.`;
  }
  if (file.size === 0) return `${quoteValue(file.name)} is empty (0 bytes).`;
  if (file.size > maxBytes) {
    return `${quoteValue(file.name)} is ${formatBytes(file.size)}; the largest file Partita accepts is ${formatBytes(maxBytes)}.`;
  }
  return null;
}

/** How a file of this size is uploaded: one PUT, or parts of `partSize` bytes. */
export function planUpload(
  size: number,
): { method: "single" } | { method: "multipart"; partSize: number; partCount: number } {
  if (size <= SINGLE_PUT_MAX_BYTES) return { method: "single" };
  const partSize = Math.max(MULTIPART_PART_BYTES, Math.ceil(size / MAX_PARTS));
  return { method: "multipart", partSize, partCount: Math.ceil(size / partSize) };
}

/**
 * A file name made safe for an object key and a download header: letters, digits, dot, dash and
 * underscore only, at most 100 characters, keeping the extension.
 */
export function sanitizeFileName(name: string): string {
  const base = name.split(/[\\/]/).at(-1) ?? "";
  const cleaned = base
    .normalize("NFKD")
    // Accents come apart under NFKD; dropping the marks keeps "données" readable as "donnees".
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/[^\w.-]+/g, "-")
    .replace(/-{2,}/g, "-")
    .replace(/^[-.]+/, "");
  if (cleaned.length <= 100) return cleaned || "file";
  const extension = extensionOf(cleaned);
  return cleaned.slice(0, 100 - extension.length) + extension;
}

/** Everything a workspace stores lives under this prefix. */
export function workspacePrefix(workspaceId: string): string {
  return `workspaces/${workspaceId}/`;
}

/** A fresh object key for an upload: `workspaces/{ws}/files/{uuid}/{sanitized name}`. */
export function buildUploadKey(workspaceId: string, fileName: string, id: string): string {
  return `${workspacePrefix(workspaceId)}files/${id}/${sanitizeFileName(fileName)}`;
}

const UUID = "[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}";

/** True when the key is an upload key of this workspace (and so one the server handed out). */
export function isUploadKeyOf(workspaceId: string, key: string): boolean {
  const prefix = `${workspacePrefix(workspaceId)}files/`;
  if (!key.startsWith(prefix)) return false;
  // The name part is what sanitizeFileName makes: no slash, no leading dot.
  return new RegExp(`^${UUID}/[\\w-][\\w.-]{0,99}$`).test(key.slice(prefix.length));
}
