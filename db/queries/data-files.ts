import "server-only";
import { and, desc, eq, ne, or, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { analyses, dataFiles, layoutPlans, type DataFilePreview } from "@/db/schema";
import { encodeListCursor, type ListCursor } from "@/lib/api/list-cursor";
import { RuleError } from "@/lib/errors";
import type { DataFileKind } from "@/lib/uploads/file-rules";

/** What the product shows of a registered file: never its object key, which stays on the server. */
export type DataFileSummary = {
  id: string;
  kind: DataFileKind;
  name: string;
  sizeBytes: number;
  createdAt: Date;
  preview: DataFilePreview | null;
  /** SHA-256 of the stored bytes; null for files registered before it was recorded. */
  sha256: string | null;
  /** Analyses that read it; a file none reads may be deleted. */
  analysisCount: number;
};

/**
 * Analyses of the file's workspace that name the file as one of their inputs. Written out with
 * qualified names: in a one-table select drizzle leaves its columns unqualified, which inside
 * this subquery would name the analyses' own columns.
 */
const analysisCount = sql<number>`(
  select count(*)::int from analyses as reader
  where reader.workspace_id = data_files.workspace_id
    and data_files.id in (reader.dataset_file_id, reader.layout_file_id, reader.weights_file_id)
)`;

const summaryColumns = {
  id: dataFiles.id,
  kind: dataFiles.kind,
  name: dataFiles.name,
  sizeBytes: dataFiles.sizeBytes,
  createdAt: dataFiles.createdAt,
  preview: dataFiles.preview,
  sha256: dataFiles.sha256,
  analysisCount,
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
    sha256: string;
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

/**
 * One page of the workspace's files of every kind, newest first (ties by id), starting after
 * `after`; `nextCursor` is null on the last page.
 */
export async function listDataFilePage(
  workspaceId: string,
  limit: number,
  after?: ListCursor,
): Promise<{ files: DataFileSummary[]; nextCursor: string | null }> {
  // One more than shown tells whether a next page exists without counting the whole list.
  const rows = await db()
    .select({ file: summaryColumns, createdAtText: sql<string>`${dataFiles.createdAt}::text` })
    .from(dataFiles)
    .where(
      and(
        eq(dataFiles.workspaceId, workspaceId),
        after
          ? sql`(${dataFiles.createdAt}, ${dataFiles.id}) < (${after.createdAt}::timestamptz, ${after.id})`
          : undefined,
      ),
    )
    .orderBy(desc(dataFiles.createdAt), desc(dataFiles.id))
    .limit(limit + 1);
  const last = rows[limit - 1];
  return {
    files: rows.slice(0, limit).map((row) => row.file),
    nextCursor:
      rows.length > limit
        ? encodeListCursor({ createdAt: last.createdAtText, id: last.file.id })
        : null,
  };
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

/**
 * A file of this workspace and kind holding exactly these bytes under another object key (the
 * oldest, if several do), or undefined: an upload of bytes already here reuses it.
 */
export async function findSameContents(
  workspaceId: string,
  values: { kind: DataFileKind; sha256: string; objectKey: string },
): Promise<DataFileSummary | undefined> {
  const [row] = await db()
    .select(summaryColumns)
    .from(dataFiles)
    .where(
      and(
        eq(dataFiles.workspaceId, workspaceId),
        eq(dataFiles.kind, values.kind),
        eq(dataFiles.sha256, values.sha256),
        ne(dataFiles.objectKey, values.objectKey),
      ),
    )
    .orderBy(dataFiles.createdAt)
    .limit(1);
  return row;
}

/**
 * Deletes a file of this workspace that no analysis reads and no layout plan splits, and returns
 * its object key for the caller to remove from storage. 404 when there is no such file, 409 when an
 * analysis reads it (its reports name it as an input, so it stays while they do) or a layout plan
 * was made of it (its comparison and maps are rows of that dataset). A layout file registered from
 * a plan's candidate is a copy and may go: the candidate's link to it is cleared (on delete).
 */
export async function deleteUnusedDataFile(
  workspaceId: string,
  fileId: string,
): Promise<{ objectKey: string; name: string }> {
  const usedBy = db()
    .select({ id: analyses.id })
    .from(analyses)
    .where(
      and(
        eq(analyses.workspaceId, workspaceId),
        or(
          eq(analyses.datasetFileId, fileId),
          eq(analyses.layoutFileId, fileId),
          eq(analyses.weightsFileId, fileId),
        ),
      ),
    );
  const plannedOn = plansOfDataset(workspaceId, fileId);
  const [deleted] = await db()
    .delete(dataFiles)
    .where(
      and(
        eq(dataFiles.workspaceId, workspaceId),
        eq(dataFiles.id, fileId),
        sql`not exists (${usedBy})`,
        sql`not exists (${plannedOn})`,
      ),
    )
    .returning({ objectKey: dataFiles.objectKey, name: dataFiles.name });
  if (deleted) return deleted;
  const file = await findDataFile(workspaceId, fileId);
  if (!file) throw new RuleError(404, "That file is not in this workspace.");
  const planCount = (await plansOfDataset(workspaceId, fileId)).length;
  throw new RuleError(409, describeReaders(file.name, file.analysisCount, planCount));
}

/** The layout plans of the workspace that split this file (their dataset). */
function plansOfDataset(workspaceId: string, fileId: string) {
  return db()
    .select({ id: layoutPlans.id })
    .from(layoutPlans)
    .where(and(eq(layoutPlans.workspaceId, workspaceId), eq(layoutPlans.datasetFileId, fileId)));
}

/** Why a file stays: the analyses that read it and the layout plans that split it. */
function describeReaders(name: string, analysisCount: number, planCount: number): string {
  const count = (n: number, one: string, many: string) => (n === 1 ? one : `${n} ${many}`);
  const readers = [
    ...(analysisCount > 0
      ? [`an input of ${count(analysisCount, "an analysis", "analyses")}`]
      : []),
    ...(planCount > 0
      ? [`the dataset of ${count(planCount, "a layout plan", "layout plans")}`]
      : []),
  ];
  const keeper =
    planCount === 0
      ? "their reports do"
      : analysisCount + planCount === 1
        ? "the plan does"
        : "they do";
  return `"${name}" is ${readers.join(" and ")}; it stays while ${keeper}.`;
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
