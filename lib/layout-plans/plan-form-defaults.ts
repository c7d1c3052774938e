import { GENERATOR_FACTS, type LayoutGenerator, type LayoutSpec } from "@/lib/analysis/browser";

/** One line of the form's generator list: a generator, its parameter if any, and what it models. */
export interface GeneratorChoice {
  key: string;
  spec: LayoutSpec;
  /** The parameter's name in the form (α, k, β) and whether the user may change it. */
  parameter: { symbol: string; field: "alpha" | "k" | "beta"; initial: number } | null;
  models: string;
  usesGroups: boolean;
}

const choice = (key: string, spec: LayoutSpec): GeneratorChoice => {
  const facts = GENERATOR_FACTS[spec.generator as LayoutGenerator];
  const parameter =
    "alpha" in spec
      ? { symbol: "α", field: "alpha" as const, initial: spec.alpha }
      : "k" in spec
        ? { symbol: "k", field: "k" as const, initial: spec.k }
        : "beta" in spec
          ? { symbol: "β", field: "beta" as const, initial: spec.beta }
          : null;
  return { key, spec, parameter, models: facts.models, usesGroups: facts.usesGroups };
};

/**
 * The form's generators, ticked by default as a practitioner expects (methods.md §8): iid,
 * stratified, Dirichlet at three concentrations, classes(2), quantity(0.5), clusters; the group
 * generators are offered once a group column is chosen.
 */
export const GENERATOR_CHOICES: GeneratorChoice[] = [
  choice("iid", { generator: "iid" }),
  choice("stratified", { generator: "stratified" }),
  choice("dirichlet-strong", { generator: "dirichlet", alpha: 0.5 }),
  choice("dirichlet-medium", { generator: "dirichlet", alpha: 5 }),
  choice("dirichlet-mild", { generator: "dirichlet", alpha: 50 }),
  choice("classes", { generator: "classes", k: 2 }),
  choice("quantity", { generator: "quantity", beta: 0.5 }),
  choice("clusters", { generator: "clusters" }),
  choice("group-hash", { generator: "group-hash" }),
  choice("group-balanced", { generator: "group-balanced" }),
];

/** Shards a new plan asks for unless the user says otherwise. */
export const DEFAULT_PLANNED_SHARDS = 10;
