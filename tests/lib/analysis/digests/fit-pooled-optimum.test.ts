import { Readable } from "node:stream";
import { describe, expect, it, vi } from "vitest";
import {
  ClientPasses,
  computeSchemaDigest,
  encodeClientRows,
  fitPooledOptimum,
  mergeEvaluationSums,
  mergeSchemaDigests,
  readClientRows,
  type EvaluationRequest,
} from "@/lib/analysis/digests";
import type { Design, Task } from "@/lib/analysis/design";
import { fitReferenceModel } from "@/lib/analysis/fit-reference-model";
import { PassPool } from "@/lib/analysis/pass-pool";
import { matrixFromValues, type Matrix } from "@/lib/math/matrix";
import { loadPenguinsCsv } from "../support/open-data";
import { runPythonJson } from "../support/run-python";

const LAMBDA = 1e-3;

/**
 * Outside reference for methods.md §2's W* from the clients' encoded rows pooled: softmax by
 * scikit-learn's `LogisticRegression(C = 1/(λN), solver="newton-cg")` on the standardized features
 * with the intercepts re-centred (methods.md §2's check), least squares by NumPy's solve of the
 * normal equations; and ∇F at the fitted W and at 0 in NumPy, for §2's stopping rule
 * ‖∇F(W*)‖ ≤ 1e-8·max(1, ‖∇F(0)‖).
 */
const REFERENCE = `import json, sys
import numpy as np
from scipy.special import softmax
from sklearn.exceptions import ConvergenceWarning
from sklearn.linear_model import LogisticRegression
import warnings
d = json.load(sys.stdin); lam = d["lam"]
X = np.array(d["x"]).reshape(-1, d["cols"]); N = len(X)
def gradient(W):
    mask = np.ones_like(W); mask[:, -1] = 0
    if d["labels"] is not None:
        Y = np.eye(W.shape[0])[d["labels"]]
        return (softmax(X @ W.T, axis=1) - Y).T @ X / N + lam * W * mask
    return ((X @ W[0] - np.array(d["targets"]))[:, None]).T @ X / N + lam * W * mask
if d["labels"] is not None:
    # newton-cg warns when its inner solver stops at its iteration cap; its optimum is checked
    # against ours below (1e-6), and ours against NumPy's gradient (§2's tolerance).
    warnings.simplefilter("ignore", ConvergenceWarning)
    model = LogisticRegression(C=1 / (lam * N), solver="newton-cg", tol=1e-10, max_iter=1000)
    model.fit(X[:, :-1], np.array(d["labels"]))
    b = model.intercept_ - model.intercept_.mean()
    W = np.hstack([model.coef_, b[:, None]])
else:
    P = np.eye(d["cols"]) * lam; P[-1, -1] = 0
    W = np.linalg.solve(X.T @ X / N + P, X.T @ np.array(d["targets"]) / N)[None, :]
fitted = np.array(d["fitted"]).reshape(W.shape)
print(json.dumps({"weights": W.ravel().tolist(), "fittedGradient": float(np.linalg.norm(gradient(fitted))),
                  "zeroGradient": float(np.linalg.norm(gradient(np.zeros_like(W))))}))`;

/** The penguins (vega-datasets) split between two clients by island, encoded with their encoding. */
async function twoClients(labelColumn: string, task: Task) {
  const [header, ...lines] = loadPenguinsCsv().csv.trimEnd().split("\n");
  const island = header.split(",").indexOf("Island");
  const parts = [
    lines.filter((line) => line.split(",")[island] === "Biscoe"),
    lines.filter((line) => line.split(",")[island] !== "Biscoe"),
  ];
  const raws = await Promise.all(
    parts.map((part, c) =>
      readClientRows({
        data: Readable.from([Buffer.from(`${[header, ...part].join("\n")}\n`, "utf8")]),
        dataName: `client-${c}.csv`,
        columns: { labelColumn, shardColumn: "Island", idColumn: "row" },
      }),
    ),
  );
  const schemas = raws.map((raw, c) => computeSchemaDigest(raw, { client: `client-${c}`, task }));
  const encoding = mergeSchemaDigests(schemas, { task });
  const passes = raws.map((raw) => new ClientPasses(encodeClientRows(raw, encoding), 1));
  return { schemas, encoding, passes };
}

/**
 * Fits W* from the two clients' answers and checks it. `claimedRows` stands in for the rows of the
 * encoding, which decides the fit's subsample (every 2nd row from 40 000 on): the clients answer
 * from their real rows all the same, so the optimum is unchanged.
 */
async function checkFit(labelColumn: string, task: Task, claimedRows?: number) {
  const clients = await twoClients(labelColumn, task);
  const { schemas, passes } = clients;
  const encoding = { ...clients.encoding, rows: claimedRows ?? clients.encoding.rows };
  try {
    const requests: EvaluationRequest[] = [];
    const progress: number[] = [];
    const width = encoding.columns.length + 1;
    const gram =
      task === "regression"
        ? Float64Array.from(
            passes
              .map((client) => client.computeGramSum().flat())
              .reduce((sum, part) => sum.map((value, k) => value + part[k])),
          )
        : undefined;
    const fit = await fitPooledOptimum(
      encoding,
      async (request) => {
        requests.push(request);
        return mergeEvaluationSums(passes.map((client) => client.evaluate(request)));
      },
      { lambda: LAMBDA, schemas, gram, onEvaluation: (count) => progress.push(count) },
    );
    const designs = passes.map((client) => client.design);
    const reference = runPythonJson<{
      weights: number[];
      fittedGradient: number;
      zeroGradient: number;
    }>(REFERENCE, {
      lam: LAMBDA,
      cols: width,
      x: designs.flatMap((design) => Array.from((design.x as Matrix).data)),
      labels:
        task === "classification" ? designs.flatMap((design) => Array.from(design.labels!)) : null,
      targets:
        task === "regression" ? designs.flatMap((design) => Array.from(design.targets!)) : null,
      fitted: Array.from(fit.weights),
    });
    expect(fit.converged).toBe(true);
    const tolerance = 1e-8 * Math.max(1, reference.zeroGradient);
    expect(Math.abs(fit.tolerance - tolerance)).toBeLessThanOrEqual(1e-12 * tolerance);
    // §2's stopping rule, checked by NumPy's gradient at the returned point.
    expect(reference.fittedGradient).toBeLessThanOrEqual(1.01 * tolerance);
    expect(Math.abs(fit.gradientNorm - reference.fittedGradient)).toBeLessThanOrEqual(
      1e-3 * tolerance,
    );
    const scale = Math.max(...reference.weights.map(Math.abs));
    const gap = Math.max(...reference.weights.map((value, k) => Math.abs(value - fit.weights[k])));
    expect(gap / scale).toBeLessThan(1e-6);
    // Each round is asked once, and counted as it is answered.
    expect(new Set(requests.map((request) => JSON.stringify(request))).size).toBe(requests.length);
    expect(progress).toEqual(requests.map((_, k) => k + 1));
    expect(requests.every((request) => request.encodingHash === encoding.hash)).toBe(true);
    return { fit, requests };
  } finally {
    await Promise.all(passes.map((client) => client.close()));
  }
}

describe("the pooled optimum fitted from the clients' sums (methods.md §2, §9)", () => {
  it("softmax on two clients' penguins: scikit-learn's optimum, and NumPy's gradient within §2's tolerance", async () => {
    const { requests } = await checkFit("Species", "classification");
    // The preconditioner's Hessian is asked for over all rows (fewer than 40 000: no subsample).
    expect(requests.some((request) => request.hessian)).toBe(true);
    expect(requests.every((request) => request.sample === null)).toBe(true);
  });

  it("asks each client for its part of every 2nd pooled row from 40 000 rows on, shards placed in code-point order", async () => {
    const { requests } = await checkFit("Species", "classification", 40_000);
    const sampled = requests.filter((request) => request.sample !== null);
    expect(sampled.length).toBeGreaterThan(0);
    // Pooled rows in shard order: Biscoe's 168 penguins, Dream's 124, then Torgersen's 52 (one
    // client holds Biscoe, the other Dream and Torgersen in the file's order: Torgersen first).
    expect(sampled[0].sample).toEqual({
      stride: 2,
      shardStarts: { Biscoe: 0, Dream: 168, Torgersen: 292 },
    });
    // The rough solve's evaluations are sampled, and the preconditioner's Hessian is asked once,
    // of the same subsample (fit-reference-model.ts's three steps).
    expect(sampled.some((request) => !request.hessian)).toBe(true);
    expect(requests.filter((request) => request.hessian)).toEqual([
      expect.objectContaining({ sample: sampled[0].sample }),
    ]);
  });

  it("least squares from the merged Σx̃x̃ᵀ: NumPy's normal equations", async () => {
    await checkFit("Body Mass (g)", "regression");
  });

  it("takes the central fit's steps on the same rows: its iterations, evaluations and points (methods.md §9)", async () => {
    // methods.md §9: W* from digests is the §2 optimizer run on the coordinator, each evaluation a
    // round. On the clients' rows pooled (344 penguins: no subsample) the central fit must ask for
    // F and ∇F at the same points in the same order, and for the preconditioner's Hessian at the
    // same point, as the pooled fit asks its rounds. Only the order of summation differs (a pass
    // over the pooled rows against per-client sums merged), so the points agree to §9's 1e-9
    // relative, and the counts exactly.
    const { schemas, encoding, passes } = await twoClients("Species", "classification");
    const pool = new PassPool(1);
    try {
      const designs = passes.map((client) => client.design);
      const width = encoding.columns.length + 1;
      const labels = Int32Array.from(designs.flatMap((design) => Array.from(design.labels!)));
      const shardIds = designs.flatMap((design) => design.shardIds);
      // Client 0 holds Biscoe, client 1 Dream and Torgersen: shards stay in code-point order.
      const offsets = [0];
      let before = 0;
      for (const design of designs) {
        for (const end of design.shardOffsets.subarray(1)) offsets.push(before + end);
        before += design.x.rows;
      }
      const x = matrixFromValues(
        labels.length,
        width,
        designs.flatMap((design) => Array.from((design.x as Matrix).data)),
      );
      const pooledDesign: Design = {
        x,
        task: "classification",
        classes: encoding.classes,
        labels,
        targets: null,
        skewCategories: labels,
        skewCategoryCount: encoding.classes!.length,
        shardIds,
        shardOffsets: Int32Array.from(offsets),
        featureNames: encoding.featureNames,
        omittedColumns: [],
        droppedRowsMissingLabel: 0,
        droppedRowsUnassigned: 0,
        badNumbersCountedMissing: [],
        warnings: [],
      };
      const central = pool.share(pooledDesign, pooledDesign.shardOffsets);
      const centralPoints: number[][] = [];
      const centralHessianPoints: number[][] = [];
      const evaluate = central.evaluate.bind(central);
      vi.spyOn(central, "evaluate").mockImplementation((weights, withSquaredNorms, centres) => {
        centralPoints.push(Array.from(weights));
        return evaluate(weights, withSquaredNorms, centres);
      });
      const computeHessian = central.computeSoftmaxHessian.bind(central);
      vi.spyOn(central, "computeSoftmaxHessian").mockImplementation((weights, lambda) => {
        centralHessianPoints.push(Array.from(weights));
        return computeHessian(weights, lambda);
      });
      const reference = fitReferenceModel(pooledDesign, central, central.computeGram(), LAMBDA);

      const requests: EvaluationRequest[] = [];
      const fit = await fitPooledOptimum(
        encoding,
        async (request) => {
          requests.push(request);
          return mergeEvaluationSums(passes.map((client) => client.evaluate(request)));
        },
        { lambda: LAMBDA, schemas },
      );
      expect(reference.converged).toBe(true);
      expect(fit.iterations).toBe(reference.iterations);
      expect(fit.evaluations).toBe(reference.evaluations);
      // The central fit evaluates W = 0 for its tolerance and again as the rough solve's start,
      // and the full solve's start again where the rough solve ended; a round is asked once.
      const distinct = centralPoints.filter(
        (point, k) =>
          centralPoints.findIndex((other) => other.every((value, j) => value === point[j])) === k,
      );
      const scale = Math.max(...reference.weights.map(Math.abs));
      const gapBetween = (a: number[], b: number[]) =>
        Math.max(...a.map((value, j) => Math.abs(value - b[j]))) / scale;
      const asked = requests.filter((request) => !request.hessian);
      expect(asked.length).toBe(distinct.length);
      const gaps = asked.map((request, k) => gapBetween(request.weights, distinct[k]));
      expect(Math.max(...gaps)).toBeLessThan(1e-9);
      const hessianRequests = requests.filter((request) => request.hessian);
      expect(hessianRequests.length).toBe(1);
      expect(centralHessianPoints.length).toBe(1);
      expect(gapBetween(hessianRequests[0].weights, centralHessianPoints[0])).toBeLessThan(1e-9);
      expect(gapBetween(Array.from(fit.weights), Array.from(reference.weights))).toBeLessThan(1e-9);
    } finally {
      await pool.close();
      await Promise.all(passes.map((client) => client.close()));
    }
  });

  it("a least-squares fit without the Gram matrix is a defect, said so", async () => {
    const { schemas, encoding, passes } = await twoClients("Body Mass (g)", "regression");
    try {
      await expect(
        fitPooledOptimum(
          encoding,
          async (request) => mergeEvaluationSums(passes.map((client) => client.evaluate(request))),
          { lambda: LAMBDA, schemas },
        ),
      ).rejects.toThrow("a least-squares fit needs the merged Gram matrix");
    } finally {
      await Promise.all(passes.map((client) => client.close()));
    }
  });
});

describe("merging the clients' answers to one evaluation", () => {
  it("adds rows and sums with compensation (math.fsum's values, by hand: plain addition gives 0)", () => {
    const part = (loss: number, hessian: number[] | null) => ({
      rows: 3,
      lossSum: loss,
      gradientSum: [loss, -loss],
      hessianSum: hessian,
    });
    const merged = mergeEvaluationSums([
      part(1e16, [1e16]),
      part(1, [1]),
      part(1, [1]),
      part(-1e16, [-1e16]),
    ]);
    expect(merged).toEqual({ rows: 12, lossSum: 2, gradientSum: [2, -2], hessianSum: [2] });
    expect(mergeEvaluationSums([part(1, null), part(2, null)]).hessianSum).toBeNull();
    expect(mergeEvaluationSums([])).toEqual({
      rows: 0,
      lossSum: 0,
      gradientSum: [],
      hessianSum: null,
    });
  });
});
