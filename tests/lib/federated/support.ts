import { createTextClient, splitAmongClients } from "@/tests/lib/analysis/digests/support";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";

/** Penguins (vega-datasets npm package) sharded by island: the columns every client reads. */
export const PENGUIN_COLUMNS = { labelColumn: "Species", shardColumn: "Island", idColumn: "row" };

/**
 * The penguins split between two clients by whole islands (seeded), as the engine's in-process
 * clients named "north" and "south"; `csv` is the pooled text for the central analysis.
 */
export async function createPenguinClients(minimumShardRows?: number) {
  const { csv } = loadPenguinsCsv();
  const [north, south] = splitAmongClients(csv, "Island", 2, 11);
  const options = minimumShardRows === undefined ? {} : { minimumShardRows };
  return {
    csv,
    texts: { north, south },
    north: await createTextClient("north", north, PENGUIN_COLUMNS, options),
    south: await createTextClient("south", south, PENGUIN_COLUMNS, options),
  };
}
