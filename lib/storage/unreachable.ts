import { S3ServiceException } from "@aws-sdk/client-s3";

/** Network failures that mean "storage did not answer", not "storage said no". */
const unreachableCodes = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "ETIMEDOUT",
  "EPIPE",
  "EHOSTUNREACH",
  "ENETUNREACH",
  "EAI_AGAIN",
  "ECONNABORTED",
]);

/**
 * Whether an error from a storage call (or from reading an object's stream) means storage could
 * not be reached or is failing on its side: a refused or reset connection, a timeout, or a 5xx
 * answer. Such a call is worth trying again later; a 403 or a missing object is not. Follows
 * `cause` chains, since readers wrap the SDK's errors.
 */
export function isStorageUnreachable(error: unknown): boolean {
  for (let current = error, depth = 0; current && depth < 5; depth += 1) {
    if (current instanceof S3ServiceException) {
      return (current.$metadata.httpStatusCode ?? 0) >= 500;
    }
    if (!(current instanceof Error)) return false;
    const code = (current as NodeJS.ErrnoException).code;
    if (code && unreachableCodes.has(code)) return true;
    if (current.name === "TimeoutError" || /socket hang up|aborted/i.test(current.message)) {
      return true;
    }
    current = current.cause;
  }
  return false;
}
