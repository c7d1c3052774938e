import { createTextClient, splitAmongClients } from "@/tests/lib/analysis/digests/support";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { runPythonJson } from "@/tests/lib/analysis/support/run-python";

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

/**
 * scikit-learn's bundled diabetes data (442 rows, 10 features, numeric target; through Debian's
 * /usr/bin/python3) with `shards` shards cut along a noisy target order (seeded), as CSV text.
 */
export function loadDiabetesWithShards(shards = 4): string {
  return runPythonJson<string>(
    `import json,io,sys
import numpy as np
from sklearn.datasets import load_diabetes
frame=load_diabetes(as_frame=True,scaled=False).frame
rng=np.random.default_rng(5)
order=np.argsort(frame["target"].to_numpy()+rng.normal(0,40,len(frame)))
shards=json.load(sys.stdin)
shard=np.empty(len(frame),dtype=int); shard[order]=np.arange(len(frame))*shards//len(frame)
frame["shard"]=["d"+str(m) for m in shard]
out=io.StringIO(); frame.to_csv(out,index=False)
print(json.dumps(out.getvalue()))`,
    shards,
  );
}
