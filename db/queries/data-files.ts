import "server-only";
import { and, desc, eq } from "drizzle-orm";
import { db } from "@/db/client";
import { dataFiles, type DataFilePreview } from "@/db/schema";
import type { DataFileKind } from "@/lib/uploads/file-rules";

/** What the product shows of a registered file: never its object key, which stays on the server. */
export type DataFileSummary = {
  id: string;
  kind: DataFileKind;
  name: string;
  sizeBytes: number;
  createdAt: Date;
  preview: DataFilePreview | null;
};

const summaryColumns = {
  id: dataFiles.id,
  kind: dataFiles.kind,
  name: dataFiles.name,
  sizeBytes: dataFiles.sizeBytes,
  createdAt: dataFiles.createdAt,
  preview: dataFiles.preview,
};

/**
 * Records a file the server has seen in storage. Registering the same object twice (a retried
 * request) returns the first registration instead of failing on the unique key.
 */
export async function insertDataFile(
  workspaceId: string,
  values: {
    kind: DataFileKind;
    name: string;
    objectKey: string;
    sizeBytes: number;
    contentType: string | null;
    preview: DataFilePreview;
    uploadedBy: string;
  },
): Promise<DataFileSummary> {
  const [inserted] = await db()
    .insert(dataFiles)
    .values({ workspaceId, ...values })
    .onConflictDoNothing({ target: dataFiles.objectKey })
    .returning(summaryColumns);
  if (inserted) return inserted;
  const existing = await findDataFileByKey(workspaceId, values.objectKey);
  if (!existing) throw new Error(`object ${values.objectKey} is registered in another workspace`);
  return existing;
}

/** A workspace's files of one kind, newest first. */
export async function listDataFiles(
  workspaceId: string,
  kind: DataFileKind,
  limit = 50,
): Promise<DataFileSummary[]> {
  return db()
    .select(summaryColumns)
    .from(dataFiles)
    .where(and(eq(dataFiles.workspaceId, workspaceId), eq(dataFiles.kind, kind)))
    .orderBy(desc(dataFiles.createdAt))
    .limit(limit);
}

/** One file of this workspace (with its object key, for server code), or undefined. */
export async function findDataFile(
  workspaceId: string,
  fileId: string,
): Promise<(DataFileSummary & { objectKey: string }) | undefined> {
  const [row] = await db()
    .select({ ...summaryColumns, objectKey: dataFiles.objectKey })
    .from(dataFiles)
    .where(and(eq(dataFiles.workspaceId, workspaceId), eq(dataFiles.id, fileId)));
  return row;
}

/** The registration of an object key in this workspace, or undefined. */
export async function findDataFileByKey(
  workspaceId: string,
  objectKey: string,
): Promise<DataFileSummary | undefined> {
  const [row] = await db()
    .select(summaryColumns)
    .from(dataFiles)
    .where(and(eq(dataFiles.workspaceId, workspaceId), eq(dataFiles.objectKey, objectKey)));
  return row;
}
