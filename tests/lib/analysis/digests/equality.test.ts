import { describe, expect, it } from "vitest";
import { analyzeFromDigests, type PartitionSummary } from "@/lib/analysis";
import { SeededRandom } from "@/lib/math/random";
import type { ReferenceWeights } from "@/lib/validation/analysis-options";
import { analyzeText } from "../support/analyze-text";
import { loadPenguinsCsv } from "../support/open-data";
import { runPythonJson } from "../support/run-python";
import { compareSummaries, createTextClient, splitAmongClients } from "./support";

/**
 * The defining test of methods.md §9: the digests of any split of the rows among clients, merged,
 * give the central analysis's summary of the same rows, options and reference to 1e-9 relative.
 */

/** Penguins (vega-datasets npm package) with a seeded, species-skewed shard column of 7 shards. */
function penguinsWithShards(): string {
  const { csv } = loadPenguinsCsv();
  const [header, ...lines] = csv.trim().split("\n");
  const random = new SeededRandom(7);
  const rows = lines.map((line) => {
    const species = line.split(",")[1];
    const lean = species === "Adelie" ? 0 : species === "Gentoo" ? 3 : 5;
    const shard = random.uniform() < 0.6 ? lean + random.integer(2) : random.integer(7);
    return `${line},s${shard}`;
  });
  return `${[`${header},shard`, ...rows].join("\n")}\n`;
}

/** scikit-learn's bundled diabetes data (442 rows, 10 features, numeric target), 6 seeded shards. */
function diabetesWithShards(): string {
  return runPythonJson<string>(`import json,io
import numpy as np
from sklearn.datasets import load_diabetes
frame=load_diabetes(as_frame=True,scaled=False).frame
rng=np.random.default_rng(3)
order=np.argsort(frame["target"].to_numpy()+rng.normal(0,40,len(frame)))
shard=np.empty(len(frame),dtype=int); shard[order]=np.arange(len(frame))*6//len(frame)
frame["shard"]=["d"+str(m) for m in shard]
out=io.StringIO(); frame.to_csv(out,index=False)
print(json.dumps(out.getvalue()))`);
}

const cases = [
  {
    name: "penguins (classification)",
    csv: penguinsWithShards,
    columns: { labelColumn: "Species", shardColumn: "shard", idColumn: "row" },
  },
  {
    name: "diabetes (regression)",
    csv: diabetesWithShards,
    columns: { labelColumn: "target", shardColumn: "shard" },
  },
];

describe("merged digests equal the central analysis (methods.md §9)", () => {
  for (const dataset of cases) {
    it(`${dataset.name}: 1, 2 and 5 clients × zero, supplied W and the pooled optimum`, async () => {
      const csv = dataset.csv();
      const plan = { localSteps: 10, rounds: 100, batchSize: 32 };
      const optimum = await analyzeText(csv, dataset.columns);
      const supplied: ReferenceWeights = {
        ...optimum.model.optimum,
        weights: optimum.model.optimum.weights.map((row) => row.map((v, j) => 0.5 * v + 0.01 * j)),
      };
      for (const reference of ["zero", supplied, "optimum"] as const) {
        const central: PartitionSummary =
          reference === "optimum"
            ? optimum
            : await analyzeText(csv, { ...dataset.columns, reference });
        for (const clientCount of [1, 2, 5]) {
          const parts = splitAmongClients(csv, "shard", clientCount, 100 + clientCount);
          const clients = await Promise.all(
            parts.map((part, c) => createTextClient(`client-${c + 1}`, part, dataset.columns)),
          );
          try {
            const merged = await analyzeFromDigests(clients, { lambda: 1e-3, reference, plan });
            const differences = compareSummaries(
              central,
              merged,
              merged.dataset.task === "regression",
              // ‖∇F(W*)‖ is the optimizer's residual: compared with its tolerance below.
            ).filter((line) => !(reference === "optimum" && line.startsWith(".model.gradNorm")));
            expect(
              differences,
              `${clientCount} clients, ${typeof reference === "string" ? reference : "supplied"}`,
            ).toEqual([]);
            if (reference === "optimum") {
              expect(merged.model.gradNorm).toBeLessThanOrEqual(merged.model.optimizer.tolerance);
            }
            expect(merged.digests?.clients).toHaveLength(clientCount);
            if (merged.dataset.task === "regression") {
              // The histogram's bins move only rows of the 4096 cells that hold a cut point.
              expect(Math.abs(merged.labelSkew.tv - central.labelSkew.tv)).toBeLessThan(0.02);
            }
          } finally {
            await Promise.all(clients.map((client) => client.close()));
          }
        }
      }
    }, 120_000);
  }
});
