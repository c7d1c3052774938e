import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis";
import {
  defaultLayoutSpecs,
  describeLayoutParameters,
  generateLayout,
  GENERATOR_FACTS,
  LAYOUT_GENERATORS,
  nameLayout,
  parseLayoutSpec,
  type LayoutSpec,
} from "@/lib/analysis/layouts/generators";
import { makeRows } from "./support";
import { inputErrorOf } from "../support/input-error";

/** The error a parse throws, for its message and `expected` field. */
function parseError(text: string): AnalysisInputError {
  return inputErrorOf(() => parseLayoutSpec(text), `"${text}" parsed`);
}

describe("layout specs: names, recorded parameters, defaults", () => {
  const specs: [LayoutSpec, string, Record<string, number>][] = [
    [{ generator: "iid" }, "iid", {}],
    [{ generator: "dirichlet", alpha: 0.5 }, "dirichlet-0.5", { alpha: 0.5 }],
    [{ generator: "dirichlet", betaPerClass: 0.1 }, "dirichlet-beta-0.1", { betaPerClass: 0.1 }],
    [{ generator: "classes", k: 2 }, "classes-2", { k: 2 }],
    [{ generator: "quantity", beta: 0.5 }, "quantity-0.5", { beta: 0.5 }],
    [{ generator: "group-balanced" }, "group-balanced", {}],
  ];

  // methods.md §8: "every layout records its generator, parameters and seed"; the names are the
  // file names of the exported maps (the generator with its parameter, as nameLayout's doc says).
  it.each(specs)("%o is named %s and records %o", (spec, name, parameters) => {
    expect(nameLayout(spec)).toBe(name);
    expect(describeLayoutParameters(spec)).toEqual(parameters);
  });

  it("runs every kind of product.md's list by default, the group ones only with a group column", () => {
    // product.md, Layouts: IID, stratified, Dirichlet, k classes per shard, quantity skew, feature
    // clusters, group-hashed, group-balanced; the Dirichlet concentrations are the α ∈ {0.5, 5, 50}
    // of methods.md §8's check, strong to mild skew.
    const withoutGroups = defaultLayoutSpecs(false);
    expect(withoutGroups.map(nameLayout)).toEqual([
      "iid",
      "stratified",
      "dirichlet-0.5",
      "dirichlet-5",
      "dirichlet-50",
      "classes-2",
      "quantity-0.5",
      "clusters",
    ]);
    expect(defaultLayoutSpecs(true).map(nameLayout)).toEqual([
      ...withoutGroups.map(nameLayout),
      "group-hash",
      "group-balanced",
    ]);
    expect(new Set(defaultLayoutSpecs(true).map((spec) => spec.generator))).toEqual(
      new Set(LAYOUT_GENERATORS),
    );
  });

  it("describes every generator in one line and marks exactly the group ones as needing groups", () => {
    for (const generator of LAYOUT_GENERATORS) {
      const { models, usesGroups } = GENERATOR_FACTS[generator];
      expect({ generator, oneLine: /^\S[^\n]{20,}$/.test(models) }).toEqual({
        generator,
        oneLine: true,
      });
      // methods.md §8: group-hash and group-balanced "need a group column"; the others do not.
      expect({ generator, usesGroups }).toEqual({
        generator,
        usesGroups: generator.startsWith("group-"),
      });
    }
    const rows = makeRows({ rows: 40, classCount: 2 });
    expect(() => generateLayout({ generator: "group-hash" }, rows, 2, 1)).toThrow(
      /group-hash layout needs a group column/,
    );
  });
});

describe("parseLayoutSpec's errors say what was expected", () => {
  it("names the unknown generator and lists the known ones", () => {
    const error = parseError("shuffle");
    expect(error.message).toContain('"shuffle"');
    for (const generator of LAYOUT_GENERATORS) expect(error.expected).toContain(generator);
    expect(parseError("dirichlet:1:2").message).toContain('"dirichlet:1:2"');
  });

  it.each([
    ["dirichlet", "a positive total concentration α"],
    ["dirichlet:0", "a positive total concentration α"],
    ["dirichlet:beta=", "a positive β per class"],
    ["dirichlet:beta=-2", "a positive β per class"],
    ["classes:2.5", "a whole number of classes per shard k ≥ 1"],
    ["classes:0", "a whole number of classes per shard k ≥ 1"],
    ["quantity: ", "a positive concentration β"],
    ["quantity:Infinity", "a positive concentration β"],
  ])("%s needs %s", (text, what) => {
    const error = parseError(text);
    expect(error.message).toContain(`"${text}" needs ${what}`);
    expect(error.expected).toContain(`VALUE ${what}`);
  });

  it("says a generator without a parameter takes none", () => {
    const error = parseError("clusters:3");
    expect(error.message).toContain('"clusters" takes no parameter');
    expect(error.expected).toBe("clusters");
  });

  it("accepts the forms its doc names", () => {
    expect(parseLayoutSpec("quantity:0.5")).toEqual({ generator: "quantity", beta: 0.5 });
    expect(parseLayoutSpec("classes:3 ")).toEqual({ generator: "classes", k: 3 });
    expect(parseLayoutSpec("iid")).toEqual({ generator: "iid" });
  });
});

describe("classes(k)'s input errors say what to change", () => {
  it("refuses a class with fewer rows than the shards that hold it, and M·k < C", () => {
    // Class 2 has one row; with k = C = 3 every one of the 3 shards holds it (methods.md §8: each
    // class's rows split over its holders), so some shard would hold a class without a row of it.
    const rows = makeRows({ rows: 12, classCount: 2 });
    const classes = Int32Array.of(0, 0, 0, 0, 1, 1, 1, 1, 0, 1, 0, 2);
    const skewed = { ...rows, classes, classCount: 3 };
    expect(() => generateLayout({ generator: "classes", k: 3 }, skewed, 3, 1)).toThrow(
      "classes(3): a class has 1 rows for 3 shards that hold it (expected at least one row of a class per shard holding it: a smaller k or fewer shards)",
    );
    expect(() => generateLayout({ generator: "classes", k: 1 }, skewed, 2, 1)).toThrow(
      "classes(1) over 2 shards leaves classes unheld (expected shards × k at least the number of classes (3): a larger k or more shards)",
    );
  });
});
