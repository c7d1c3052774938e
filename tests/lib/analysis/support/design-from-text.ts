import { Readable } from "node:stream";
import type { Design, Task } from "@/lib/analysis/design";
import { encodeDesign } from "@/lib/analysis/encode-design";
import { readDataset } from "@/lib/analysis/read-dataset";

/** Reads and encodes CSV text with a shard column, as the engine does before fitting. */
export async function designFromText(
  csv: string,
  labelColumn: string,
  shardColumn: string,
  task?: Task,
): Promise<Design> {
  const raw = await readDataset(
    Readable.from([csv]),
    "data.csv",
    { labelColumn, shardColumn },
    {
      partition: null,
      dropUnassignedRows: false,
    },
  );
  return encodeDesign(raw, task);
}
