import { z } from "zod";
import { DATA_FILE_KINDS } from "@/lib/uploads/file-rules";

const kind = z.enum(DATA_FILE_KINDS, {
  message: "Say whether this is a dataset, layout or weights.",
});
const objectKey = z.string().min(1, "Name the uploaded object.").max(1024);
const uploadId = z.string().min(1, "Name the multipart upload.").max(1024);
const partNumber = z.number().int().min(1).max(10_000);

/** The browser's description of a file it wants to upload, before any byte is sent. */
export const createUploadSchema = z.object({
  name: z.string().trim().min(1, "The file needs a name.").max(255, "The file name is too long."),
  size: z.number().int().nonnegative(),
  kind,
  contentType: z.string().max(255).default(""),
});
export type CreateUploadInput = z.input<typeof createUploadSchema>;

/** Fresh part URLs for a multipart upload whose first URLs are about to expire. */
export const signPartsSchema = z.object({
  key: objectKey,
  uploadId,
  partNumbers: z.array(partNumber).min(1).max(10_000),
});

export const completeMultipartSchema = z.object({
  key: objectKey,
  uploadId,
  parts: z
    .array(z.object({ partNumber, etag: z.string().min(1).max(200) }))
    .min(1, "A multipart upload needs at least one part."),
});

export const abortMultipartSchema = z.object({ key: objectKey, uploadId });

/** Registering an object the browser finished uploading. */
export const registerDataFileSchema = z.object({
  key: objectKey,
  name: z.string().trim().min(1, "The file needs a name.").max(255, "The file name is too long."),
  kind,
});
export type RegisterDataFileInput = z.input<typeof registerDataFileSchema>;

/** What the server answers to createUpload: where and how the browser sends the bytes. */
export type UploadTicket =
  | {
      method: "single";
      key: string;
      url: string;
      /** Headers the PUT must carry exactly (the signature covers the content type). */
      headers: Record<string, string>;
    }
  | {
      method: "multipart";
      key: string;
      uploadId: string;
      partSize: number;
      parts: { partNumber: number; url: string }[];
    };
