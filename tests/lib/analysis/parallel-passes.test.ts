import { execFileSync } from "node:child_process";
import { createReadStream, mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Worker } from "node:worker_threads";
import { beforeAll, describe, expect, it } from "vitest";
import { analyzePartition, type PartitionSummary } from "@/lib/analysis";
import {
  completeUnfinishedTasks,
  countTasks,
  createControl,
  createScratch,
  GRAM_CHUNK_ROWS,
  passSlotSize,
  planChunks,
  runTasks,
  type Job,
  type SharedDesignData,
} from "@/lib/analysis/pass-jobs";
import { PassPool } from "@/lib/analysis/pass-pool";
import { matrixFromValues } from "@/lib/math/matrix";
import { REFERENCE_PYTHON, runPythonJson } from "./support/run-python";

interface Reference {
  weights: number[];
  optimum: { loss: number; zeta2: number; sigma2: number; sigma2Pooled: number };
}

function seededValues(count: number, seed: number): Float64Array {
  let state = seed;
  return Float64Array.from({ length: count }, () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648 - 0.5;
  });
}

function relativeError(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.max(Math.abs(expected), 1e-300);
}

describe("passes shared by worker threads", () => {
  let file = "";
  beforeAll(() => {
    file = path.join(mkdtempSync(path.join(tmpdir(), "partita-threads-")), "data.csv");
    // Outside data: scikit-learn's make_classification (seeded), with a label-skewed split into 6
    // shards drawn by NumPy. 45 000 rows take the fit's subsample warm start (stride 2).
    runPythonJson(
      `import json,sys
import numpy as np, pandas as pd
from sklearn.datasets import make_classification
X,y=make_classification(n_samples=45000,n_features=6,n_informative=4,n_redundant=0,n_classes=4,n_clusters_per_class=1,random_state=3)
rng=np.random.default_rng(5)
frame=pd.DataFrame(X,columns=[f"f{j}" for j in range(6)])
frame["label"]=["k"+str(v) for v in y]
frame["shard"]=["s"+str((v+rng.integers(0,3))%6) for v in y]
frame.to_csv(json.load(sys.stdin),index=False,float_format="%.10g")
print("null")`,
      file,
    );
  });

  it("give the same summary bit for bit with 1, 2 and 3 threads, at scikit-learn's optimum (45 000 rows)", async () => {
    // Outside reference: tests/lib/analysis/support/reference_statistics.py (scikit-learn's
    // LogisticRegression(C = 1/(λN), solver='newton-cg') for W*, NumPy per-sample gradients).
    const reference = JSON.parse(
      execFileSync(
        REFERENCE_PYTHON,
        [path.join(import.meta.dirname, "support", "reference_statistics.py")],
        {
          input: JSON.stringify({ csv: file, label: "label", shard: "shard", lam: 1e-3 }),
          encoding: "utf8",
          maxBuffer: 256 * 2 ** 20,
        },
      ),
    ) as Reference;

    const summaries: PartitionSummary[] = [];
    for (const threads of [1, 2, 3]) {
      summaries.push(
        await analyzePartition({
          data: createReadStream(file),
          dataName: "data.csv",
          options: { labelColumn: "label", shardColumn: "shard", lambda: 1e-3 },
          threads,
        }),
      );
    }
    const [single, ...parallel] = summaries.map((summary) => JSON.stringify(summary));
    for (const summary of parallel) expect(summary).toBe(single);

    const summary = summaries[0];
    expect(summary.dataset).toMatchObject({ rows: 45_000, features: 6, classes: 4 });
    expect(summary.model.optimizer.converged).toBe(true);
    // W* is defined to the optimizer tolerance (see reference-model.test.ts for the tolerances).
    summary.model.optimum.weights
      .flat()
      .forEach((value, k) => expect(Math.abs(value - reference.weights[k])).toBeLessThan(1e-4));
    expect(Math.abs(summary.model.loss - reference.optimum.loss)).toBeLessThan(1e-10);
    const heterogeneity = summary.heterogeneity;
    expect(relativeError(heterogeneity.zeta2, reference.optimum.zeta2)).toBeLessThan(1e-5);
    expect(relativeError(heterogeneity.sigma2, reference.optimum.sigma2)).toBeLessThan(1e-5);
    expect(relativeError(heterogeneity.sigma2Pooled, reference.optimum.sigma2Pooled)).toBeLessThan(
      1e-5,
    );
  }, 120_000);

  it("give the same pass totals, Gram matrix and Hessian bit for bit on 1, 2 and 3 threads", async () => {
    const rows = 300_000;
    const cols = 16;
    const classes = 10;
    const values = seededValues(rows * cols, 4);
    const labels = Int32Array.from({ length: rows }, (_, row) =>
      Math.floor((values[row * cols] + 0.5) * classes),
    );
    const design = { x: matrixFromValues(rows, cols, values), labels, targets: null };
    const sample = {
      x: matrixFromValues(2000, cols, values.subarray(0, 2000 * cols)),
      labels,
      targets: null,
    };
    const weights = seededValues(classes * cols, 6);
    const outcomes: Float64Array[][] = [];
    for (const threads of [1, 2, 3]) {
      const pool = new PassPool(threads);
      try {
        await pool.whenReady();
        const shared = pool.share(design, Int32Array.of(0, 70_000, 70_001, 300_000));
        const pass = shared.evaluate(weights, true);
        outcomes.push([
          ...pass.shards.flatMap((totals) => [
            Float64Array.of(totals.rows, totals.lossSum, totals.squaredGradientNormSum),
            totals.gradientSum,
            totals.gradientCompensation,
          ]),
          pass.pooled.gradientSum,
          shared.computeGram(),
          pool.share(sample, Int32Array.of(0, 2000)).computeSoftmaxHessian(weights, 0.01),
        ]);
        // Which thread ran which task is left to the scheduler here; the orders and overlaps the
        // scheduler can produce are forced one by one in the test below.
      } finally {
        await pool.close();
      }
    }
    for (const outcome of outcomes.slice(1)) {
      outcome.forEach((array, k) => expect(Array.from(array)).toEqual(Array.from(outcomes[0][k])));
    }
  }, 120_000);

  it("give the same results whatever order tasks run in and when two threads run the same one", () => {
    // The interleavings threads can produce, forced on one thread so the test does not depend on
    // scheduling: a thread claims tasks from the shared counter (`runTasks`); the calling thread
    // then runs those claimed but not yet flagged done (`completeUnfinishedTasks`); and a paused
    // thread may finish a task the calling thread already ran, writing its slot a second time.
    const rows = 40_000;
    const cols = 12;
    const values = seededValues(rows * cols, 8);
    const shardOffsets = Int32Array.of(0, 9_000, 9_001, rows);
    const design: SharedDesignData = {
      id: 0,
      x: matrixFromValues(rows, cols, values),
      labels: Int32Array.from({ length: rows }, (_, row) => (values[row * cols] > 0 ? 1 : 0)),
      targets: null,
      chunkStarts: planChunks(shardOffsets),
    };
    const weights = seededValues(2 * cols, 9);
    const jobs = (): Extract<Job, { results: Float64Array }>[] => [
      {
        kind: "pass",
        designId: 0,
        weights,
        withSquaredNorms: true,
        centres: null,
        results: new Float64Array((design.chunkStarts.length - 1) * passSlotSize(weights.length)),
      },
      {
        kind: "gram",
        designId: 0,
        results: new Float64Array(Math.ceil(rows / GRAM_CHUNK_ROWS) * cols * cols),
      },
    ];
    const inOrder = jobs();
    for (const job of inOrder)
      runTasks(job, design, createControl(countTasks(job, design)), createScratch());

    const reordered = jobs();
    for (const job of reordered) {
      const tasks = countTasks(job, design);
      expect(tasks).toBeGreaterThan(2);
      const control = createControl(tasks);
      // Another thread claimed the first two tasks and paused: the calling thread runs the rest,
      // then those two, with its own scratch space.
      Atomics.store(control, 0, 2);
      runTasks(job, design, control, createScratch());
      completeUnfinishedTasks(job, design, control, createScratch());
      // The paused thread wakes and writes every slot again, with scratch left over from the
      // other job (a stale partial sum would show here).
      const late = createControl(tasks);
      const leftover = createScratch();
      for (const other of jobs())
        runTasks(other, design, createControl(countTasks(other, design)), leftover);
      completeUnfinishedTasks(job, design, late, leftover);
    }
    reordered.forEach((job, k) =>
      expect(Array.from(job.results)).toEqual(Array.from(inOrder[k].results)),
    );
  });

  it("work when the engine itself runs in a worker thread (as the web app's background worker does)", async () => {
    const inThread = await new Promise<string>((resolve, reject) => {
      const thread = new Worker(new URL("./support/engine-thread-entry.mjs", import.meta.url), {
        execArgv: [],
        workerData: { file, threads: 2 },
      });
      thread.once("message", (json: string) => {
        void thread.terminate();
        resolve(json);
      });
      thread.once("error", reject);
    });
    const here = await analyzePartition({
      data: createReadStream(file),
      dataName: "data.csv",
      options: { labelColumn: "label", shardColumn: "shard", lambda: 1e-3 },
      threads: 1,
    });
    expect(inThread).toBe(JSON.stringify(here));
  }, 120_000);

  it("compute X̃ᵀX̃/N like NumPy on two threads, and the doc example", async () => {
    const rows = 40_000;
    const cols = 5;
    const values = seededValues(rows * cols, 9);
    const pool = new PassPool(2);
    try {
      const design = { x: matrixFromValues(rows, cols, values), labels: null, targets: null };
      const gram = pool.share(design, Int32Array.of(0, rows)).computeGram();
      // Outside reference: NumPy X.T @ X / N.
      const reference = runPythonJson<number[]>(
        `import json,sys
import numpy as np
X=np.array(json.load(sys.stdin)).reshape(${rows},${cols})
print(json.dumps((X.T@X/${rows}).ravel().tolist()))`,
        Array.from(values),
      );
      gram.forEach((value, k) => expect(value).toBeCloseTo(reference[k], 14));

      const example = { x: matrixFromValues(2, 2, [1, 2, 3, 4]), labels: null, targets: null };
      const small = pool.share(example, Int32Array.of(0, 2)).computeGram();
      expect(Array.from(small)).toEqual([5, 7, 7, 10]);
    } finally {
      await pool.close();
    }
  });
});
