import { SeededRandom } from "../../math/random";
import { AnalysisInputError } from "../errors";
import { onThisThread, type ShareKMeansRows } from "./kmeans-steps";
import type { LayoutRows, ShardAssignment } from "./layout-rows";
import { splitClusters } from "./split-clusters";
import { splitClasses, splitDirichlet, splitIid, splitStratified } from "./split-by-label";
import { splitGroupBalanced, splitGroupHash } from "./split-by-group";
import { splitQuantity } from "./split-by-size";

/** The generators of methods.md §8. */
export const LAYOUT_GENERATORS = [
  "iid",
  "stratified",
  "dirichlet",
  "classes",
  "quantity",
  "clusters",
  "group-hash",
  "group-balanced",
] as const;
export type LayoutGenerator = (typeof LAYOUT_GENERATORS)[number];

/**
 * One candidate to generate. `dirichlet` takes α, the total concentration of §4, or β per class
 * (α = β·C) — exactly one of them; `classes` takes k; `quantity` takes β over the shards.
 */
export type LayoutSpec =
  | { generator: "iid" | "stratified" | "clusters" | "group-hash" | "group-balanced" }
  | { generator: "dirichlet"; alpha: number }
  | { generator: "dirichlet"; betaPerClass: number }
  | { generator: "classes"; k: number }
  | { generator: "quantity"; beta: number };

interface GeneratorFacts {
  /** What split it models, in one line (CLI help, the web form). */
  models: string;
  usesGroups: boolean;
}

export const GENERATOR_FACTS: Record<LayoutGenerator, GeneratorFacts> = {
  iid: { models: "rows shuffled and dealt evenly: the near-IID baseline", usesGroups: false },
  stratified: {
    models: "every shard gets each class in the pooled proportion: the most even label mix",
    usesGroups: false,
  },
  dirichlet: {
    models:
      "equal-sized shards whose label mixes are drawn from Dir(α·p): smaller α, stronger label skew",
    usesGroups: false,
  },
  classes: {
    models: "each shard holds only k classes: sharding by label, the harshest label skew",
    usesGroups: false,
  },
  quantity: {
    models: "shard sizes drawn from Dir(β·1), label mix left random: smaller β, more unequal sizes",
    usesGroups: false,
  },
  clusters: {
    models:
      "k-means clusters of the features as shards: sites or devices that see different inputs",
    usesGroups: false,
  },
  "group-hash": {
    models: "whole groups (users, devices, sites) hashed to shards, as pipelines commonly do",
    usesGroups: true,
  },
  "group-balanced": {
    models: "whole groups placed to even out label mixes and sizes across shards",
    usesGroups: true,
  },
};

/** The candidates run when none are named: three Dirichlet concentrations span strong to mild skew. */
export function defaultLayoutSpecs(withGroups: boolean): LayoutSpec[] {
  return [
    { generator: "iid" },
    { generator: "stratified" },
    { generator: "dirichlet", alpha: 0.5 },
    { generator: "dirichlet", alpha: 5 },
    { generator: "dirichlet", alpha: 50 },
    { generator: "classes", k: 2 },
    { generator: "quantity", beta: 0.5 },
    { generator: "clusters" },
    ...(withGroups
      ? ([{ generator: "group-hash" }, { generator: "group-balanced" }] as const)
      : []),
  ];
}

/**
 * Parses one entry of a generator list: `iid`, `dirichlet:0.5` (α total), `dirichlet:beta=0.1`
 * (β per class), `classes:2`, `quantity:0.5`, …
 */
export function parseLayoutSpec(text: string): LayoutSpec {
  const [name, parameter, ...rest] = text.trim().split(":");
  const known = (LAYOUT_GENERATORS as readonly string[]).includes(name);
  if (!known || rest.length > 0) {
    throw new AnalysisInputError(`unknown layout generator "${text}"`, {
      expected: `one of ${LAYOUT_GENERATORS.join(", ")}, with a parameter where it takes one (dirichlet:0.5, classes:2, quantity:0.5)`,
    });
  }
  const generator = name as LayoutGenerator;
  const positive = (value: string | undefined, what: string) => {
    const number = Number(value);
    if (value === undefined || value.trim() === "" || !(number > 0) || !Number.isFinite(number)) {
      throw new AnalysisInputError(`layout generator "${text}" needs ${what}`, {
        expected: `${generator}:VALUE with VALUE ${what}`,
      });
    }
    return number;
  };
  switch (generator) {
    case "dirichlet":
      return parameter?.startsWith("beta=")
        ? { generator, betaPerClass: positive(parameter.slice(5), "a positive β per class") }
        : { generator, alpha: positive(parameter, "a positive total concentration α") };
    case "classes":
      // A fractional k is as wrong as a missing one: "0" reads the same way to the check.
      return {
        generator,
        k: positive(
          Number.isInteger(Number(parameter)) ? parameter : "0",
          "a whole number of classes per shard k ≥ 1",
        ),
      };
    case "quantity":
      return { generator, beta: positive(parameter, "a positive concentration β") };
    default:
      if (parameter !== undefined) {
        throw new AnalysisInputError(`layout generator "${generator}" takes no parameter`, {
          expected: generator,
        });
      }
      return { generator };
  }
}

/** The parameters a layout records (methods.md §8: generator, parameters, seed). */
export function describeLayoutParameters(spec: LayoutSpec): Record<string, number> {
  return Object.fromEntries(Object.entries(spec).filter(([key]) => key !== "generator")) as Record<
    string,
    number
  >;
}

/** File-safe name of a candidate: the generator with its parameter, e.g. `dirichlet-0.5`. */
export function nameLayout(spec: LayoutSpec): string {
  switch (spec.generator) {
    case "dirichlet":
      return "alpha" in spec ? `dirichlet-${spec.alpha}` : `dirichlet-beta-${spec.betaPerClass}`;
    case "classes":
      return `classes-${spec.k}`;
    case "quantity":
      return `quantity-${spec.beta}`;
    default:
      return spec.generator;
  }
}

/**
 * Generates one layout of the rows into `shardCount` shards, seeded with Partita's generator
 * (xoshiro128**, lib/math/random.ts): the same rows, spec and seed give the same layout. `share`
 * says where the clusters generator's k-means runs (default: on this thread alone); the layout is
 * the same wherever it runs.
 */
export function generateLayout(
  spec: LayoutSpec,
  rows: LayoutRows,
  shardCount: number,
  seed: number,
  share: ShareKMeansRows = onThisThread,
): ShardAssignment {
  if (GENERATOR_FACTS[spec.generator].usesGroups && rows.groups === null) {
    throw new AnalysisInputError(`the ${spec.generator} layout needs a group column`, {
      expected: "a group column (rows of one user, device or site stay together)",
    });
  }
  const random = new SeededRandom(seed);
  switch (spec.generator) {
    case "iid":
      return splitIid(rows, shardCount, random);
    case "stratified":
      return splitStratified(rows, shardCount, random);
    case "dirichlet": {
      const alpha = "alpha" in spec ? spec.alpha : spec.betaPerClass * rows.classCount;
      return splitDirichlet(rows, shardCount, random, alpha);
    }
    case "classes":
      return splitClasses(rows, shardCount, random, spec.k);
    case "quantity":
      return splitQuantity(rows, shardCount, random, spec.beta);
    case "clusters":
      return splitClusters(rows, shardCount, random, share);
    case "group-hash":
      return splitGroupHash(rows, shardCount);
    case "group-balanced":
      return splitGroupBalanced(rows, shardCount);
  }
}
