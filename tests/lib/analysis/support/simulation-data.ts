import type { Design, Task } from "@/lib/analysis/design";
import { loadPenguinsCsv } from "./open-data";
import { designFromText } from "./design-from-text";
import { runPythonJson } from "./run-python";

/**
 * The penguins of `vega-datasets` (BSD-3-Clause) without the `row` id column, with a `part` column
 * naming each row's shard as `shardOf` says (row index, species, island). With `copies`, every row
 * appears once per copy and each copy is a shard of its own (a homogeneous split).
 */
export function penguinsWithShards(
  shardOf: (index: number, record: Record<string, string>) => string,
  copies = 1,
): string {
  const lines = loadPenguinsCsv().csv.trimEnd().split("\n");
  // The vega penguins have no quoted fields, so splitting on commas is exact.
  const header = lines[0].split(",").slice(1);
  const out = [[...header, "part"].join(",")];
  for (let copy = 0; copy < copies; copy++) {
    lines.slice(1).forEach((line, index) => {
      const fields = line.split(",").slice(1);
      const record = Object.fromEntries(header.map((name, j) => [name, fields[j]]));
      const shard = copies > 1 ? `copy${copy}` : shardOf(index, record);
      out.push([...fields, shard].join(","));
    });
  }
  return `${out.join("\n")}\n`;
}

/**
 * scikit-learn's bundled diabetes data (Efron et al. 2004; 442 rows, 10 features, a numeric target)
 * split deterministically by the target: rows below the median target form shard "low", the rest
 * "high" — a strongly heterogeneous least-squares split.
 */
export function loadDiabetesByTargetCsv(): string {
  return runPythonJson<string>(`import json,io
import numpy as np
from sklearn.datasets import load_diabetes
frame=load_diabetes(as_frame=True).frame
frame["part"]=np.where(frame["target"]<np.median(frame["target"]),"low","high")
out=io.StringIO(); frame.to_csv(out,index=False)
print(json.dumps(out.getvalue()))`);
}

export function designOf(csv: string, label: string, task?: Task): Promise<Design> {
  return designFromText(csv, label, "part", task);
}

/**
 * Open data: the vega-datasets penguins, one shard per island (168, 124 and 52 rows), as a
 * classification design (the species) and a regression design (the flipper length).
 */
export async function penguinDesigns(): Promise<{ classification: Design; regression: Design }> {
  const csv = penguinsWithShards((_, record) => record.Island);
  return {
    classification: await designOf(csv, "Species"),
    regression: await designOf(csv, "Flipper Length (mm)", "regression"),
  };
}

/** The design as plain arrays for a NumPy reference. */
export function exportDesign(design: Design) {
  return {
    x: Array.from(design.x.data),
    rows: design.x.rows,
    cols: design.x.cols,
    labels: design.labels === null ? null : Array.from(design.labels),
    classes: design.classes === null ? 1 : design.classes.length,
    targets: design.targets === null ? null : Array.from(design.targets),
  };
}
