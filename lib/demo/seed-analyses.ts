import "server-only";
import { randomUUID } from "node:crypto";
import { count, eq } from "drizzle-orm";
import { db } from "@/db/client";
import { dataFiles } from "@/db/schema";
import { DEMO_PLAN, generateOrchardDemo } from "@/lib/demo/orchards";
import { queueAnalysis } from "@/lib/reports/queue-analysis";
import { putObject } from "@/lib/storage";
import { buildUploadKey } from "@/lib/uploads/file-rules";
import { registerUpload } from "@/lib/uploads/register-upload";

/** The demo reports' titles, which the review seed looks the finished reports up by. */
export const DEMO_REPORT_TITLES = {
  byOrchard: "Orchard sensors, one shard per orchard",
  shuffled: "Orchard sensors, rows shuffled across 24 shards",
} as const;

/**
 * Puts one demo file into object storage under the workspace's prefix and registers it through the
 * same path a browser upload takes (HEAD, ranged preview, checks), so the demo proves that path.
 */
async function uploadDemoFile(input: {
  workspaceId: string;
  uploadedBy: string;
  kind: "dataset" | "layout";
  name: string;
  text: string;
}): Promise<string> {
  const key = buildUploadKey(input.workspaceId, input.name, randomUUID());
  await putObject({ key, body: input.text, contentType: "text/csv" });
  const file = await registerUpload(input.workspaceId, input.uploadedBy, {
    key,
    name: input.name,
    kind: input.kind,
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
      title: DEMO_REPORT_TITLES.byOrchard,
      name: "layout-by-orchard.csv",
      text: demo.byOrchard,
    },
    {
      title: DEMO_REPORT_TITLES.shuffled,
      name: "layout-shuffled.csv",
      text: demo.shuffled,
    },
  ];
  for (const layout of layouts) {
    const layoutFileId = await upload("layout", layout.name, layout.text);
    await queueAnalysis(workspaceId, analystId, {
      title: layout.title,
      datasetFileId,
      layoutFileId,
      options: { labelColumn: "condition", idColumn: "row_id", ...DEMO_PLAN },
    });
  }
  return true;
}
