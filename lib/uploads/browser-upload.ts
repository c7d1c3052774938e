// The browser's half of an upload: ask the server for presigned URLs, send the bytes straight to
// storage with XMLHttpRequest (fetch reports no upload progress), and finish or abort a multipart
// upload. Browser-only: no Node or Next.js imports.
import type { DataFileKind } from "./file-rules";
import type { UploadTicket } from "@/lib/validation/upload";

/** A failure whose message is written for the person uploading. */
export class UploadError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "UploadError";
  }
}

export interface UploadRequest {
  workspaceId: string;
  file: File;
  kind: DataFileKind;
  /** Aborting it stops every request in flight and drops a multipart upload. */
  signal: AbortSignal;
  /** Bytes stored so far out of file.size. */
  onProgress(loaded: number): void;
}

/** Parts sent at the same time; more rarely helps one browser and makes progress jumpy. */
const PARALLEL_PARTS = 3;
/** A failed part is tried again this many times (a dropped connection, a busy server). */
const PART_RETRIES = 2;
/** Part URLs older than this are renewed before use; the server signs them for 15 minutes. */
const PART_URL_RENEW_MS = 10 * 60 * 1000;

const uploadsPath = (workspaceId: string) => `/api/workspaces/${workspaceId}/uploads`;

const abortError = () => new DOMException("The upload was cancelled.", "AbortError");

async function postJson<T>(url: string, body: unknown, signal?: AbortSignal): Promise<T> {
  let response: Response;
  try {
    response = await fetch(url, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify(body),
      signal,
    });
  } catch (error) {
    if (signal?.aborted) throw abortError();
    throw new UploadError(
      `Partita could not be reached (${error instanceof Error ? error.message : "network error"}). Check your connection and try again.`,
    );
  }
  const payload = (await response.json().catch(() => null)) as
    (T & { error?: { message?: string } }) | null;
  if (!response.ok) {
    throw new UploadError(
      payload?.error?.message ?? `The server refused the upload (HTTP ${response.status}).`,
    );
  }
  return payload as T;
}

/** Storage answered a PUT with an error status, or (status 0) the connection failed. */
class StorageRefusal extends UploadError {
  constructor(readonly status: number) {
    super(
      status === 0
        ? "The connection to storage failed during the upload. Check your connection and try again."
        : `Storage refused the upload (HTTP ${status}). Please try again.`,
    );
  }
}

/**
 * One PUT of `body` to a presigned URL, reporting bytes sent. Resolves with the ETag storage
 * returned (exposed through the bucket's CORS rule).
 */
function putWithProgress(request: {
  url: string;
  body: Blob;
  headers?: Record<string, string>;
  signal: AbortSignal;
  onProgress(loaded: number): void;
}): Promise<string> {
  return new Promise((resolve, reject) => {
    if (request.signal.aborted) {
      reject(abortError());
      return;
    }
    const xhr = new XMLHttpRequest();
    const stop = () => xhr.abort();
    request.signal.addEventListener("abort", stop, { once: true });
    const settle = () => request.signal.removeEventListener("abort", stop);
    xhr.open("PUT", request.url);
    for (const [name, value] of Object.entries(request.headers ?? {})) {
      xhr.setRequestHeader(name, value);
    }
    xhr.upload.onprogress = (event) => request.onProgress(event.loaded);
    xhr.onload = () => {
      settle();
      if (xhr.status >= 200 && xhr.status < 300) {
        request.onProgress(request.body.size);
        resolve(xhr.getResponseHeader("ETag") ?? "");
      } else {
        reject(new StorageRefusal(xhr.status));
      }
    };
    xhr.onerror = () => {
      settle();
      reject(new StorageRefusal(0));
    };
    xhr.onabort = () => {
      settle();
      reject(abortError());
    };
    xhr.send(request.body);
  });
}

const isRetryable = (error: unknown) =>
  error instanceof StorageRefusal && (error.status === 0 || error.status >= 500);

/** Uploads a file straight to storage; resolves with its object key, ready to be registered. */
export async function uploadToStorage(request: UploadRequest): Promise<string> {
  const { workspaceId, file, kind, signal } = request;
  const ticket = await postJson<UploadTicket>(
    uploadsPath(workspaceId),
    { name: file.name, size: file.size, kind, contentType: file.type },
    signal,
  );
  if (ticket.method === "single") {
    await putWithProgress({
      url: ticket.url,
      body: file,
      headers: ticket.headers,
      signal,
      onProgress: request.onProgress,
    });
    return ticket.key;
  }
  try {
    await uploadParts(request, ticket);
  } catch (error) {
    // Best effort: the parts stored so far should not linger; the user sees the original error.
    void postJson(`${uploadsPath(workspaceId)}/multipart/abort`, {
      key: ticket.key,
      uploadId: ticket.uploadId,
    }).catch(() => undefined);
    throw error;
  }
  return ticket.key;
}

async function uploadParts(
  request: UploadRequest,
  ticket: Extract<UploadTicket, { method: "multipart" }>,
): Promise<void> {
  const { workspaceId, file } = request;
  // The first failing part stops the others instead of letting them upload for nothing.
  const halt = new AbortController();
  const stopAll = () => halt.abort();
  request.signal.addEventListener("abort", stopAll, { once: true });
  const signal = halt.signal;
  const urls = new Map(ticket.parts.map((part) => [part.partNumber, part.url]));
  let signedAt = Date.now();
  const pending = ticket.parts.map((part) => part.partNumber);
  const loadedByPart = new Map<number, number>();
  const etags: { partNumber: number; etag: string }[] = [];
  const reportProgress = () => {
    let loaded = 0;
    for (const bytes of loadedByPart.values()) loaded += bytes;
    request.onProgress(loaded);
  };

  // One renewal at a time: the parallel senders all notice old URLs at about the same moment.
  let renewal: Promise<void> | undefined;
  const renewUrlsIfOld = async () => {
    if (!renewal && (Date.now() - signedAt < PART_URL_RENEW_MS || pending.length === 0)) return;
    renewal ??= (async () => {
      const { parts } = await postJson<{ parts: { partNumber: number; url: string }[] }>(
        `${uploadsPath(workspaceId)}/multipart/parts`,
        { key: ticket.key, uploadId: ticket.uploadId, partNumbers: [...pending] },
        signal,
      );
      for (const part of parts) urls.set(part.partNumber, part.url);
      signedAt = Date.now();
    })().finally(() => {
      renewal = undefined;
    });
    await renewal;
  };

  const sendPart = async (partNumber: number) => {
    const start = (partNumber - 1) * ticket.partSize;
    const body = file.slice(start, Math.min(start + ticket.partSize, file.size));
    for (let attempt = 0; ; attempt++) {
      try {
        const etag = await putWithProgress({
          url: urls.get(partNumber) ?? "",
          body,
          signal,
          onProgress: (loaded) => {
            loadedByPart.set(partNumber, loaded);
            reportProgress();
          },
        });
        if (!etag) {
          throw new UploadError(
            "Storage did not reveal the part's ETag to the browser (its CORS rule must expose ETag).",
          );
        }
        etags.push({ partNumber, etag });
        return;
      } catch (error) {
        loadedByPart.set(partNumber, 0);
        if (attempt >= PART_RETRIES || !isRetryable(error)) throw error;
      }
    }
  };

  const worker = async () => {
    for (;;) {
      await renewUrlsIfOld();
      const partNumber = pending.shift();
      if (partNumber === undefined) return;
      await sendPart(partNumber);
    }
  };
  try {
    await Promise.all(Array.from({ length: PARALLEL_PARTS }, worker));
  } catch (error) {
    stopAll();
    throw error;
  } finally {
    request.signal.removeEventListener("abort", stopAll);
  }
  await postJson(
    `${uploadsPath(workspaceId)}/multipart/complete`,
    { key: ticket.key, uploadId: ticket.uploadId, parts: etags },
    request.signal,
  );
}
