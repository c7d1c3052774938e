import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import {
  ClientPasses,
  computeGradientDigest,
  computeSchemaDigest,
  encodeClientRows,
  mergeSchemaDigests,
  readClientRows,
  type DigestEncoding,
  type MeasurementRequest,
} from "@/lib/analysis/digests";
import type { Task } from "@/lib/analysis/design";
import type { Matrix } from "@/lib/math/matrix";
import { loadPenguinsCsv } from "../support/open-data";
import { runPythonJson } from "../support/run-python";

/**
 * Round 2 of methods.md §9 against NumPy/SciPy on the client's encoded rows: per shard Σℓᵢ, Σ∇ℓᵢ
 * (C × (d+1), row-major, regularizer excluded) and Σ‖∇ℓᵢ‖² at the reference point, Σℓᵢ and Σ∇ℓᵢ at
 * t·W for t ∈ {0, ¼, ½, ¾, 1}, Σx̃ᵢ over the d features, the rows per class (or the histogram of
 * the standardized target on 4096 equal cells between the pooled min and max, the maximum in the
 * last cell), and once Σx̃ᵢx̃ᵢᵀ — §2's softmax and least-squares losses written out in NumPy.
 */
const REFERENCE = `import json, sys
import numpy as np
from scipy.special import logsumexp, softmax
d = json.load(sys.stdin)
X = np.array(d["x"]).reshape(d["rows"], d["cols"]); offsets = d["offsets"]
def sums(W, rows):
    Xs = X[rows]
    if d["labels"] is not None:
        y = np.array(d["labels"])[rows]; S = Xs @ W.T
        loss = logsumexp(S, axis=1) - S[np.arange(len(y)), y]
        R = softmax(S, axis=1) - np.eye(W.shape[0])[y]
    else:
        R = (Xs @ W[0] - np.array(d["targets"])[rows])[:, None]; loss = 0.5 * R[:, 0] ** 2
    G = np.einsum("ic,ij->icj", R, Xs).reshape(len(y) if d["labels"] is not None else len(Xs), -1)
    return {"lossSum": float(loss.sum()), "gradientSum": G.sum(0).tolist(),
            "squaredGradientNormSum": float((G ** 2).sum())}
reference = np.array(d["reference"]); end = np.array(d["pathEnd"])
shards = []
for m in range(len(offsets) - 1):
    rows = np.arange(offsets[m], offsets[m + 1])
    shard = {"rows": len(rows), "featureSums": X[rows, :-1].sum(0).tolist(),
             "atReference": sums(reference, rows),
             "alongPath": [dict(sums(t * end, rows), squaredGradientNormSum=None) for t in [0, 0.25, 0.5, 0.75, 1]]}
    if d["labels"] is not None:
        shard["labelCounts"] = np.bincount(np.array(d["labels"])[rows], minlength=d["classes"]).tolist()
    else:
        t = d["target"]; low = (t["min"] - t["mean"]) / t["std"]; span = (t["max"] - t["mean"]) / t["std"] - low
        cells = np.clip(np.floor((np.array(d["targets"])[rows] - low) / span * 4096), 0, 4095).astype(int)
        values, counts = np.unique(cells, return_counts=True)
        shard["targetHistogram"] = [[int(v), int(c)] for v, c in zip(values, counts)]
    shards.append(shard)
print(json.dumps({"gram": (X.T @ X).tolist(), "shards": shards}))`;

interface ReferenceSums {
  lossSum: number;
  gradientSum: number[];
  squaredGradientNormSum: number | null;
}

/** Numbers within 1e-12 of the largest entry's size (a vector is compared as a vector). */
function expectVector(actual: number[], expected: number[], what: string) {
  expect(actual.length, what).toBe(expected.length);
  const scale = Math.max(1e-300, ...expected.map(Math.abs));
  const gap = Math.max(0, ...actual.map((value, k) => Math.abs(value - expected[k])));
  expect(gap / scale, what).toBeLessThan(1e-12);
}

function expectSums(actual: ReferenceSums, expected: ReferenceSums, what: string) {
  expectVector([actual.lossSum], [expected.lossSum], `${what} loss`);
  expectVector(actual.gradientSum, expected.gradientSum, `${what} gradient`);
  if (expected.squaredGradientNormSum === null) expect(actual.squaredGradientNormSum).toBeNull();
  else
    expectVector(
      [actual.squaredGradientNormSum as number],
      [expected.squaredGradientNormSum],
      `${what} norms`,
    );
}

/** The penguins (vega-datasets) by island as one client: schema, encoding, encoded rows. */
async function penguinsClient(labelColumn: string, task: Task) {
  const raw = await readClientRows({
    data: Readable.from([Buffer.from(loadPenguinsCsv().csv, "utf8")]),
    dataName: "penguins.csv",
    columns: { labelColumn, shardColumn: "Island", idColumn: "row" },
  });
  const encoding = mergeSchemaDigests([computeSchemaDigest(raw, { client: "north", task })], {
    task,
  });
  return { encoding, passes: new ClientPasses(encodeClientRows(raw, encoding), 1) };
}

/** A reference point and a path end with entries of both signs (invented, deterministic). */
function pointsFor(encoding: DigestEncoding): MeasurementRequest {
  const rows = encoding.classes?.length ?? 1;
  const width = encoding.columns.length + 1;
  const point = (scale: number, shift: number) =>
    Array.from({ length: rows }, (_, c) =>
      Array.from({ length: width }, (_, j) => scale * Math.sin(1 + shift + 3 * c + j)),
    );
  return {
    encodingHash: encoding.hash,
    reference: "given",
    referenceWeights: point(0.4, 0),
    pathEnd: point(0.7, 5),
  };
}

async function checkAgainstNumpy(labelColumn: string, task: Task) {
  const { encoding, passes } = await penguinsClient(labelColumn, task);
  try {
    const request = pointsFor(encoding);
    const digest = computeGradientDigest("north", passes, encoding, request);
    const { design } = passes;
    const x = design.x as Matrix;
    const expected = runPythonJson<{
      gram: number[][];
      shards: (Record<string, unknown> & {
        rows: number;
        featureSums: number[];
        atReference: ReferenceSums;
        alongPath: ReferenceSums[];
      })[];
    }>(REFERENCE, {
      x: Array.from(x.data),
      rows: x.rows,
      cols: x.cols,
      offsets: Array.from(design.shardOffsets),
      labels: design.labels && Array.from(design.labels),
      targets: design.targets && Array.from(design.targets),
      classes: encoding.classes?.length ?? 1,
      target: encoding.target,
      reference: request.referenceWeights,
      pathEnd: request.pathEnd,
    });
    expect(digest.kind).toBe("partita-gradient-digest");
    expect(digest.client).toBe("north");
    expect(digest.encodingHash).toBe(encoding.hash);
    expect(digest.request).toEqual(request);
    expect(digest.totalRows).toBe(344);
    expect(digest.droppedRowsMissingLabel).toBe(design.droppedRowsMissingLabel);
    expect(digest.shards.map((shard) => shard.id)).toEqual(["Biscoe", "Dream", "Torgersen"]);
    digest.gram.forEach((row, j) => expectVector(row, expected.gram[j], `gram row ${j}`));
    digest.shards.forEach((shard, m) => {
      const reference = expected.shards[m];
      expect(shard.rows).toBe(reference.rows);
      expectVector(shard.featureSums, reference.featureSums, `${shard.id} feature sums`);
      expectSums(shard.atReference, reference.atReference, `${shard.id} at the reference`);
      expect(shard.alongPath).toHaveLength(5);
      shard.alongPath.forEach((sums, t) =>
        expectSums(sums, reference.alongPath[t], `${shard.id} path point ${t}`),
      );
      expect(shard.labelCounts).toEqual(reference.labelCounts ?? null);
      expect(shard.targetHistogram).toEqual(reference.targetHistogram ?? null);
    });
    return digest;
  } finally {
    await passes.close();
  }
}

describe("the gradient digest (methods.md §9 round 2)", () => {
  it("softmax on the penguins by island: every per-shard sum equals NumPy's", async () => {
    const digest = await checkAgainstNumpy("Species", "classification");
    expect(digest.shards[0].labelCounts).toHaveLength(3);
  });

  it("least squares on the penguins' body mass: the sums and the 4096-cell target histogram equal NumPy's", async () => {
    const digest = await checkAgainstNumpy("Body Mass (g)", "regression");
    const cells = digest.shards.flatMap((shard) => shard.targetHistogram!.map(([cell]) => cell));
    // The lightest penguin is in cell 0 and the heaviest in the last one.
    expect(Math.min(...cells)).toBe(0);
    expect(Math.max(...cells)).toBe(4095);
  });

  it("refuses a request made for another encoding, quoting both hashes", async () => {
    const { encoding, passes } = await penguinsClient("Species", "classification");
    try {
      const request = { ...pointsFor(encoding), encodingHash: "f".repeat(64) };
      expect(() => computeGradientDigest("north", passes, encoding, request)).toThrow(
        `client "north": the request quotes encoding ffffffffffff…, not ${encoding.hash.slice(0, 12)}…`,
      );
    } finally {
      await passes.close();
    }
  });
});
