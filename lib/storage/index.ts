// The only way Partita talks to object storage (S3, or the local fake through S3_ENDPOINT).
// No Next.js or server-only imports: the analysis worker and scripts use it too.
export { createStorageTarget, storage, type StorageTarget } from "./client";
export {
  deleteObject,
  getObjectRange,
  getObjectRangeStream,
  getObjectStream,
  headObject,
  putObject,
  type ObjectDetails,
  type ObjectStream,
  type PutObjectRequest,
} from "./objects";
export {
  presignPut,
  presignUploadPart,
  type PresignPutRequest,
  type PresignUploadPartRequest,
} from "./presign";
export {
  abortMultipartUpload,
  completeMultipartUpload,
  createMultipartUpload,
  type UploadedPart,
} from "./multipart";
export { isStorageUnreachable } from "./unreachable";
