import { createHash, randomUUID } from "node:crypto";
import { db } from "@/db/client";
import { dataFiles } from "@/db/schema";
import { putObject } from "@/lib/storage";
import { storedContentTypeOf } from "@/lib/uploads/file-rules";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";

export const sha256 = (text: string) => createHash("sha256").update(text).digest("hex");

export interface StoredInput {
  id: string;
  name: string;
  objectKey: string;
  bytes: Buffer;
}

/**
 * Puts a file into the S3 fake under the workspace's prefix and registers it, as the upload flow
 * does once the browser's PUT has landed.
 */
export async function storeInput(
  workspace: { workspaceId: string; uploadedBy: string },
  kind: "dataset" | "layout" | "weights",
  name: string,
  content: string | Uint8Array,
): Promise<StoredInput> {
  const objectKey = `workspaces/${workspace.workspaceId}/files/${randomUUID()}/${name}`;
  const bytes = typeof content === "string" ? Buffer.from(content, "utf8") : Buffer.from(content);
  const contentType = storedContentTypeOf(name, kind);
  await putObject({ key: objectKey, body: bytes, contentType });
  const [row] = await db()
    .insert(dataFiles)
    .values({
      workspaceId: workspace.workspaceId,
      kind,
      name,
      objectKey,
      sizeBytes: bytes.length,
      contentType,
      uploadedBy: workspace.uploadedBy,
    })
    .returning({ id: dataFiles.id });
  return { id: row.id, name, objectKey, bytes };
}

/** Penguins (vega-datasets, BSD-3) with a `row` id column, and a partition map by island. */
export const PENGUINS = loadPenguinsCsv();

/** The options the penguins runs use: species from the measurements and sex, rows by id. */
export const PENGUIN_OPTIONS = {
  labelColumn: "Species",
  idColumn: "row",
  features: ["Beak Length (mm)", "Beak Depth (mm)", "Flipper Length (mm)", "Body Mass (g)", "Sex"],
};

/** The penguins dataset and its island map, stored and registered in the workspace. */
export async function storePenguins(workspace: { workspaceId: string; uploadedBy: string }) {
  const dataset = await storeInput(workspace, "dataset", "penguins.csv", PENGUINS.csv);
  const layout = await storeInput(workspace, "layout", "islands.csv", PENGUINS.islandMap);
  return { dataset, layout };
}
