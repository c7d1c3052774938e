import "server-only";
import { randomUUID } from "node:crypto";
import { count, eq } from "drizzle-orm";
import { db } from "@/db/client";
import { insertAnalysis, setAnalysisJobId } from "@/db/queries/analyses";
import { insertDataFile } from "@/db/queries/data-files";
import { dataFiles, type DataFilePreview } from "@/db/schema";
import { DEMO_PLAN, generateOrchardDemo } from "@/lib/demo/orchards";
import { enqueueAnalysis } from "@/lib/jobs";
import { putObject } from "@/lib/storage";
import { buildUploadKey } from "@/lib/uploads/file-rules";
import { inspectDataset, inspectLayout } from "@/lib/uploads/inspect-upload";
import { PREVIEW_BYTES } from "@/lib/uploads/csv-preview";
import { startAnalysisSchema } from "@/lib/validation/start-analysis";

const encoder = new TextEncoder();

/**
 * Puts one demo file into object storage under the workspace's prefix and registers it, exactly as
 * a browser upload would end up: same key scheme, same preview.
 */
async function uploadDemoFile(input: {
  workspaceId: string;
  uploadedBy: string;
  kind: "dataset" | "layout";
  name: string;
  text: string;
}): Promise<string> {
  const bytes = encoder.encode(input.text);
  const objectKey = buildUploadKey(input.workspaceId, input.name, randomUUID());
  await putObject({ key: objectKey, body: bytes, contentType: "text/csv" });
  const source = {
    bytes: bytes.subarray(0, PREVIEW_BYTES),
    totalBytes: bytes.length,
    fileName: input.name,
  };
  const preview: DataFilePreview =
    input.kind === "dataset" ? inspectDataset(source) : inspectLayout(source);
  const file = await insertDataFile(input.workspaceId, {
    kind: input.kind,
    name: input.name,
    objectKey,
    sizeBytes: bytes.length,
    contentType: "text/csv",
    preview,
    uploadedBy: input.uploadedBy,
  });
  return file.id;
}

/**
 * The demo's two analyses: the orchard sensors dataset with the by-orchard layout (skewed) and
 * with a shuffled layout (near-IID), queued for the worker so a new user lands on two finished
 * reports whose verdicts disagree. Runs once: a demo workspace that already holds files is left
 * as it is.
 */
export async function seedDemoAnalyses(workspaceId: string, analystId: string): Promise<boolean> {
  const [{ files }] = await db()
    .select({ files: count() })
    .from(dataFiles)
    .where(eq(dataFiles.workspaceId, workspaceId));
  if (files > 0) return false;

  const demo = generateOrchardDemo();
  const upload = (kind: "dataset" | "layout", name: string, text: string) =>
    uploadDemoFile({ workspaceId, uploadedBy: analystId, kind, name, text });
  const datasetFileId = await upload("dataset", "orchard-leaf-sensors.csv", demo.dataset);
  const layouts = [
    {
      title: "Orchard sensors, one shard per orchard",
      name: "layout-by-orchard.csv",
      text: demo.byOrchard,
    },
    {
      title: "Orchard sensors, rows shuffled across 24 shards",
      name: "layout-shuffled.csv",
      text: demo.shuffled,
    },
  ];
  for (const layout of layouts) {
    const layoutFileId = await upload("layout", layout.name, layout.text);
    const request = startAnalysisSchema.parse({
      datasetFileId,
      layoutFileId,
      options: { labelColumn: "condition", idColumn: "row_id", ...DEMO_PLAN },
    });
    const analysisId = await insertAnalysis(workspaceId, analystId, {
      ...request,
      title: layout.title,
    });
    const jobId = await enqueueAnalysis({ analysisId, workspaceId });
    await setAnalysisJobId(workspaceId, analysisId, jobId);
  }
  return true;
}
