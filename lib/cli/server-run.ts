import { open, stat } from "node:fs/promises";
import path from "node:path";
import type { AnalysisProgress, SimulationProgress } from "../analysis";
import type { AnalysisOptionsInput } from "../validation/analysis-options";
import { storedContentTypeOf, type DataFileKind } from "../uploads/file-rules";
import type { UploadTicket } from "../validation/upload";
import { createApiClient, ServerError, type ApiClient } from "./api-client";

export type ServerRunRequest = {
  server: string;
  token: string;
  dataPath: string;
  partitionPath?: string;
  /** Reference weights as a JSON file; the server reads it as the analysis's reference point. */
  weightsPath?: string;
  options: AnalysisOptionsInput;
  onProgress: (progress: AnalysisProgress) => void;
  /** The simulation's run and round (options.simulate), as the server last stored them. */
  onSimulationProgress?: (progress: SimulationProgress) => void;
  /** The analysis as soon as the server accepted it, and the report once it is stored. */
  onAnalysisStarted?: (analysis: { id: string }) => void;
  onReportStored?: (report: { id: string; url: string }) => void;
  pollIntervalMs?: number;
};

type AnalysisStatus = {
  status: "queued" | "running" | "succeeded" | "failed" | "cancelled";
  stage: AnalysisProgress["stage"] | null;
  fraction: number;
  simulation?: SimulationProgress | null;
  failureMessage: string | null;
  reportId: string | null;
};

/** Reads bytes [start, start + length) of a file, for one PUT. */
async function readSlice(
  file: string,
  start: number,
  length: number,
): Promise<Uint8Array<ArrayBuffer>> {
  const handle = await open(file, "r");
  try {
    const buffer = new Uint8Array(length);
    const { bytesRead } = await handle.read(buffer, 0, length, start);
    return buffer.subarray(0, bytesRead);
  } finally {
    await handle.close();
  }
}

async function putBytes(
  url: string,
  body: Uint8Array<ArrayBuffer>,
  headers: Record<string, string> = {},
) {
  const response = await fetch(url, { method: "PUT", headers, body });
  if (!response.ok) {
    throw new ServerError(
      response.status,
      "storage",
      `storage refused the upload (${response.status})`,
    );
  }
  return response.headers.get("etag") ?? "";
}

/** Sends one file through the API's presigned URL(s) and registers it; returns its file id. */
async function uploadFile(api: ApiClient, file: string, kind: DataFileKind): Promise<string> {
  const name = path.basename(file);
  const { size } = await stat(file);
  const contentType = storedContentTypeOf(name, kind);
  const ticket = await api.postJson<UploadTicket>("/api/v1/uploads", {
    name,
    size,
    kind,
    contentType,
  });
  if (ticket.method === "single") {
    await putBytes(ticket.url, await readSlice(file, 0, size), ticket.headers);
  } else {
    // One part in memory at a time, so a file of any size uploads in bounded memory.
    const parts: { partNumber: number; etag: string }[] = [];
    for (const { partNumber, url } of ticket.parts) {
      const start = (partNumber - 1) * ticket.partSize;
      const bytes = await readSlice(file, start, Math.min(ticket.partSize, size - start));
      parts.push({ partNumber, etag: await putBytes(url, bytes) });
    }
    await api.postJson("/api/v1/uploads/complete", {
      key: ticket.key,
      uploadId: ticket.uploadId,
      parts,
    });
  }
  const registered = await api.postJson<{ id: string }>("/api/v1/files", {
    key: ticket.key,
    name,
    kind,
  });
  return registered.id;
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** A failure the server reported for the analysis itself; its message is written for the user. */
export class ServerAnalysisError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ServerAnalysisError";
  }
}

/**
 * The same analysis as the local engine, run by a Partita server: uploads the files through the
 * API's upload URLs, registers them, starts the analysis, reports progress while polling, and
 * returns the report's JSON summary exactly as the server sends it.
 */
export async function runOnServer(request: ServerRunRequest): Promise<string> {
  const api = createApiClient(request.server, request.token);
  // A bad token or address fails here, before any upload; the workspace names the report's page.
  const { workspace } = await api.getJson<{ workspace: { id: string } }>("/api/v1/workspace");
  const datasetFileId = await uploadFile(api, request.dataPath, "dataset");
  const layoutFileId = request.partitionPath
    ? await uploadFile(api, request.partitionPath, "layout")
    : undefined;
  const weightsFileId = request.weightsPath
    ? await uploadFile(api, request.weightsPath, "weights")
    : undefined;
  const { analysisId } = await api.postJson<{ analysisId: string }>("/api/v1/analyses", {
    datasetFileId,
    layoutFileId,
    weightsFileId,
    options: request.options,
  });
  request.onAnalysisStarted?.({ id: analysisId });
  for (;;) {
    const status = await api.getJson<AnalysisStatus>(`/api/v1/analyses/${analysisId}`);
    if (status.stage) request.onProgress({ stage: status.stage, fraction: status.fraction });
    if (status.simulation) request.onSimulationProgress?.(status.simulation);
    if (status.status === "succeeded" && status.reportId) {
      const url = new URL(`/w/${workspace.id}/reports/${status.reportId}`, request.server);
      request.onReportStored?.({ id: status.reportId, url: url.toString() });
      return api.getText(`/api/v1/reports/${status.reportId}`);
    }
    if (status.status === "failed" || status.status === "cancelled") {
      throw new ServerAnalysisError(
        status.failureMessage ?? `the analysis was ${status.status} on the server`,
      );
    }
    await sleep(request.pollIntervalMs ?? 1000);
  }
}
