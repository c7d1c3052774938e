import { describe, expect, it } from "vitest";
import { runAlgorithm, type TrainingPlan } from "@/lib/analysis/simulation/run-algorithm";
import { chooseCurveRounds } from "@/lib/analysis/simulation/simulate-plan";
import { runPythonJson } from "./support/run-python";
import {
  designOf,
  exportDesign,
  loadDiabetesByTargetCsv,
  penguinsWithShards,
} from "./support/simulation-data";

const LAMBDA = 1e-3;

/** Largest relative difference of two equally long arrays, against the larger entry's size. */
function relativeGap(a: Float64Array, b: ArrayLike<number>): number {
  let gap = 0;
  for (let i = 0; i < a.length; i++) {
    gap = Math.max(gap, Math.abs(a[i] - b[i]) / Math.max(1e-300, Math.abs(a[i]), Math.abs(b[i])));
  }
  return gap;
}

describe("identities of methods.md §7", () => {
  it("with K = 1, local SGD and minibatch SGD take the same steps on the same draws", async () => {
    // Open data: penguins (vega-datasets), one shard per island, 2 of 3 shards drawn each round.
    const design = await designOf(
      penguinsWithShards((_, record) => record.Island),
      "Species",
    );
    const problem = { design, lambda: LAMBDA, optimumValue: 0, startValue: Math.log(3) };
    const rounds = chooseCurveRounds(40);
    const plan = (localSteps: number): TrainingPlan => ({
      participants: 2,
      localSteps,
      rounds: 40,
      batchSize: 8,
    });
    const stepSize = 0.3;
    const minibatch = await runAlgorithm("minibatch", problem, plan(1), stepSize, 11, rounds);
    const local = await runAlgorithm("local", problem, plan(1), stepSize, 11, rounds);
    expect(minibatch.diverged).toBe(false);
    // Identity up to rounding: Σ pₘ(W − η gₘ) and W − η Σ pₘ gₘ differ only in the last bits.
    expect(relativeGap(local.suboptimality, minibatch.suboptimality)).toBeLessThan(1e-12);
    // The check can fail: with K = 2 the algorithms differ.
    const minibatch2 = await runAlgorithm("minibatch", problem, plan(2), stepSize, 11, rounds);
    const local2 = await runAlgorithm("local", problem, plan(2), stepSize, 11, rounds);
    expect(relativeGap(local2.suboptimality, minibatch2.suboptimality)).toBeGreaterThan(1e-4);
  });

  it("with b = all rows and every shard a copy of the data, a local-SGD round is K steps of gradient descent (NumPy reference)", async () => {
    const design = await designOf(
      penguinsWithShards(() => "", 3),
      "Species",
    );
    const localSteps = 5;
    const rounds = 4;
    const stepSize = 0.7;
    const plan = { participants: 3, localSteps, rounds, batchSize: design.x.rows };
    const problem = { design, lambda: LAMBDA, optimumValue: 0, startValue: Math.log(3) };
    const outcome = await runAlgorithm(
      "local",
      problem,
      plan,
      stepSize,
      1,
      chooseCurveRounds(rounds),
    );
    // Outside reference: plain gradient descent on F (methods.md §2) written in NumPy, F after
    // every K-th step.
    const expected = runPythonJson<number[]>(
      `import json,sys
import numpy as np
d=json.load(sys.stdin)
X=np.array(d["x"]).reshape(d["rows"],d["cols"]); y=np.array(d["labels"]); C=d["classes"]
lam,eta,K,R=d["lam"],d["eta"],d["K"],d["R"]
Y=np.eye(C)[y]; W=np.zeros((C,d["cols"])); mask=np.ones_like(W); mask[:,-1]=0
def F(W):
    S=X@W.T; m=S.max(axis=1,keepdims=True); lse=(m[:,0]+np.log(np.exp(S-m).sum(axis=1)))
    return float(np.mean(lse-S[np.arange(len(y)),y])+lam/2*np.sum((W*mask)**2))
def G(W):
    S=X@W.T; P=np.exp(S-S.max(axis=1,keepdims=True)); P/=P.sum(axis=1,keepdims=True)
    return (P-Y).T@X/len(y)+lam*W*mask
out=[F(W)]
for r in range(R):
    for k in range(K): W=W-eta*G(W)
    out.append(F(W))
print(json.dumps(out))`,
      { ...exportDesign(design), lam: LAMBDA, eta: stepSize, K: localSteps, R: rounds },
    );
    expect(outcome.diverged).toBe(false);
    expect(relativeGap(outcome.suboptimality, expected)).toBeLessThan(1e-12);
  });

  it("on a deterministic heterogeneous least-squares split, SCAFFOLD reaches W* and local SGD with K > 1 stalls", async () => {
    // Open data: scikit-learn's diabetes, split by the target's median; b = all rows, so no noise.
    const design = await designOf(loadDiabetesByTargetCsv(), "target", "regression");
    const lambda = 1e-2;
    // Outside reference: F(W*) and the smoothness H from NumPy's normal equations.
    const reference = runPythonJson<{ optimum: number; smoothness: number }>(
      `import json,sys
import numpy as np
d=json.load(sys.stdin); lam=d["lam"]
X=np.array(d["x"]).reshape(d["rows"],d["cols"]); y=np.array(d["targets"]); N=len(y)
P=np.eye(d["cols"])*lam; P[-1,-1]=0
w=np.linalg.solve(X.T@X/N+P,X.T@y/N)
F=0.5*np.mean((X@w-y)**2)+lam/2*np.sum(w[:-1]**2)
print(json.dumps({"optimum":float(F),"smoothness":float(np.linalg.eigvalsh(X.T@X/N).max()+lam)}))`,
      { ...exportDesign(design), lam: lambda },
    );
    const problem = { design, lambda, optimumValue: reference.optimum, startValue: 0.5 };
    const rounds = 600;
    const plan = { participants: 2, localSteps: 8, rounds, batchSize: design.x.rows };
    const curve = chooseCurveRounds(rounds);
    const stepSize = 0.5 / reference.smoothness;
    const scaffold = await runAlgorithm("scaffold", problem, plan, stepSize, 1, curve);
    const local = await runAlgorithm("local", problem, plan, stepSize, 1, curve);
    const last = curve.length - 1;

    // SCAFFOLD's fixed point is W* (methods.md §7): F − F* down to rounding of F's scale.
    expect(Math.abs(scaffold.suboptimality[last])).toBeLessThan(1e-10);
    // Local SGD settles at a biased point: it stops improving, well above F*.
    expect(local.suboptimality[last]).toBeGreaterThan(1e-4);
    const earlier = local.suboptimality[Math.floor(last / 2)];
    expect(Math.abs(earlier - local.suboptimality[last])).toBeLessThan(1e-6 * earlier);
  });
});
