import { describe, expect, it } from "vitest";
import { softmaxInPlace } from "@/lib/math/softmax";
import { runPythonJson } from "../analysis/support/run-python";

describe("softmaxInPlace on a slice", () => {
  it("matches SciPy on slices whose largest logit is first, last or beside a larger neighbour", () => {
    // The values outside each slice are far larger than those inside: the maximum must be taken
    // over the slice alone, or exp underflows to 0 for every term and the result is NaN.
    const cases = [
      { values: [1000, 1, 5000], offset: 0, length: 2 },
      { values: [4000, -3, 999, 1000], offset: 1, length: 3 },
      { values: [-2, -700, 3000], offset: 0, length: 2 },
    ];
    // Outside reference: scipy.special.softmax / logsumexp of each slice.
    const reference = runPythonJson<{ p: number[][]; lse: number[] }>(
      `import json,sys
from scipy.special import softmax, logsumexp
cases=json.load(sys.stdin)
rows=[c["values"][c["offset"]:c["offset"]+c["length"]] for c in cases]
print(json.dumps({"p":[softmax(r).tolist() for r in rows],"lse":[float(logsumexp(r)) for r in rows]}))`,
      cases,
    );
    cases.forEach(({ values, offset, length }, index) => {
      const slice = Float64Array.from(values);
      expect(softmaxInPlace(slice, offset, length)).toBeCloseTo(reference.lse[index], 12);
      reference.p[index].forEach((probability, c) =>
        expect(slice[offset + c]).toBeCloseTo(probability, 15),
      );
      // Values outside the slice are left alone.
      expect(slice[offset + length]).toBe(values[offset + length]);
    });
  });
});
