import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { runPythonJson } from "./run-python";

const require = createRequire(import.meta.url);

export interface PenguinRecord {
  Species: string;
  Island: string;
  [column: string]: string | number | null;
}

/**
 * The penguins data from the `vega-datasets` npm package (BSD-3-Clause; Palmer penguins, Gorman,
 * Williams & Fraser 2014), as CSV with a `row` id column. Its missing values (null) become empty
 * fields, and its "Sex" column has a "." level, so imputation and one-hot encoding are exercised.
 */
export function loadPenguinsCsv(): { csv: string; islandMap: string } {
  const records = loadPenguinsRecords();
  const columns = Object.keys(records[0]);
  const quote = (value: string) => (/[",]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value);
  const lines = [["row", ...columns].map(quote).join(",")];
  const mapLines = ["row_id,shard"];
  records.forEach((record, index) => {
    lines.push(
      [String(index), ...columns.map((c) => (record[c] === null ? "" : String(record[c])))]
        .map(quote)
        .join(","),
    );
    mapLines.push(`${index},${record.Island}`);
  });
  return { csv: `${lines.join("\n")}\n`, islandMap: `${mapLines.join("\n")}\n` };
}

/** The penguins records of the `vega-datasets` npm package as it ships them (null where missing). */
export function loadPenguinsRecords(): PenguinRecord[] {
  // The package's exports map hides data/, so locate it next to the resolved entry point (build/).
  const entry = require.resolve("vega-datasets");
  const file = path.join(path.dirname(entry), "..", "data", "penguins.json");
  return JSON.parse(readFileSync(file, "utf8")) as PenguinRecord[];
}

/**
 * A scikit-learn bundled dataset (load_wine: UCI wine recognition data, 178 rows, 13 features,
 * 3 classes) with a seeded Dirichlet(α·1) label-skewed split into `shards` shards, as CSV text with a
 * `shard` column. The split is drawn by NumPy's default_rng(seed): for each class, the shares of
 * its rows per shard ~ Dir(α) (the partition scheme of Hsu et al. 2019, from memory).
 */
export function loadWineDirichletCsv(seed: number, alpha: number, shards: number): string {
  return runPythonJson<string>(
    `import json,sys,io
import numpy as np
from sklearn.datasets import load_wine
seed,alpha,shards=json.load(sys.stdin)
data=load_wine(as_frame=True)
frame=data.frame.rename(columns={"target":"cultivar"})
frame["cultivar"]=["c"+str(v) for v in frame["cultivar"]]
rng=np.random.default_rng(seed)
assign=np.empty(len(frame),dtype=int)
for c in sorted(frame["cultivar"].unique()):
    rows=np.where(frame["cultivar"]==c)[0]; rng.shuffle(rows)
    shares=rng.dirichlet([alpha]*shards)
    cuts=(np.cumsum(shares)*len(rows)).astype(int)[:-1]
    for m,part in enumerate(np.split(rows,cuts)): assign[part]=m
frame["shard"]=["s"+str(m) for m in assign]
out=io.StringIO(); frame.to_csv(out,index=False)
print(json.dumps(out.getvalue()))`,
    [seed, alpha, shards],
  );
}

/** Made once per process by /usr/bin/python3, per number of copies. */
const stackedDigits = new Map<number, string>();

/**
 * scikit-learn's bundled digits (UCI optical recognition of handwritten digits: 1797 rows, 64 pixel
 * features, the digit as a 10-class label), `copies` copies stacked, as CSV text with a seeded
 * label-skewed `shard` column (12 shards; NumPy's default_rng(13)), every 97th row's pixel_2_3
 * blanked (imputation) and a three-level `ink` category from each image's pixel sum (one-hot).
 */
export function loadStackedDigitsCsv(copies: number): string {
  let csv = stackedDigits.get(copies);
  if (csv === undefined) {
    csv = runPythonJson<string>(
      `import json,sys,io
import numpy as np
import pandas as pd
from sklearn.datasets import load_digits
copies=json.load(sys.stdin)
digits=load_digits(as_frame=True)
frame=pd.concat([digits.frame.rename(columns={"target":"digit"})]*copies,ignore_index=True)
rng=np.random.default_rng(13)
home=frame["digit"].to_numpy()%12
frame["shard"]=["s"+str(h if rng.random()<0.6 else rng.integers(12)) for h in home]
frame.loc[::97,"pixel_2_3"]=np.nan
ink=digits.frame.drop(columns="target").sum(axis=1)
cuts=np.quantile(ink,[1/3,2/3])
frame["ink"]=np.tile(np.where(ink<cuts[0],"light",np.where(ink<cuts[1],"medium","dark")),copies)
out=io.StringIO(); frame.to_csv(out,index=False)
print(json.dumps(out.getvalue()))`,
      copies,
    );
    stackedDigits.set(copies, csv);
  }
  return csv;
}
