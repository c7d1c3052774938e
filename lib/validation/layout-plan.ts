import { z } from "zod";
import { analysisOptionsSchema } from "./analysis-options";

const positive = z.number().positive().finite();

/** One generator with its parameter (methods.md §8), as lib/analysis's LayoutSpec. */
export const layoutSpecSchema = z.union([
  z.object({
    generator: z.enum(["iid", "stratified", "clusters", "group-hash", "group-balanced"]),
  }),
  z.object({ generator: z.literal("dirichlet"), alpha: positive }),
  z.object({ generator: z.literal("dirichlet"), betaPerClass: positive }),
  z.object({ generator: z.literal("classes"), k: z.number().int().positive() }),
  z.object({ generator: z.literal("quantity"), beta: positive }),
]);

/** Most candidates one plan may ask for: each is a full analysis on the shared worker. */
export const MAX_LAYOUT_CANDIDATES = 16;
/** Most shards a planned layout may have on the server (the CLI has no such limit). */
export const MAX_PLANNED_SHARDS = 1000;

/**
 * What the browser and the API send to plan layouts: the registered dataset, the options every
 * candidate is scored with (no shard column: the planner makes the shards, no simulation: the
 * server's worker is shared), the group column, M, the generators and the seed.
 */
export const layoutPlanSchema = z
  .object({
    title: z.string().trim().min(1).max(120, "Keep the title under 120 characters."),
    datasetFileId: z.string().min(1, "Upload or choose a dataset."),
    options: analysisOptionsSchema,
    groupColumn: z.string().trim().min(1).optional(),
    shardCount: z
      .number()
      .int("The number of shards is a whole number.")
      .min(2, "Ask for at least 2 shards.")
      .max(MAX_PLANNED_SHARDS, `Ask for at most ${MAX_PLANNED_SHARDS} shards.`),
    generators: z
      .array(layoutSpecSchema)
      .min(1, "Choose at least one generator.")
      .max(MAX_LAYOUT_CANDIDATES, `Choose at most ${MAX_LAYOUT_CANDIDATES} generators.`),
    seed: z
      .number()
      .int("The seed is a whole number.")
      .min(0)
      .max(2 ** 32 - 1, "The seed is at most 4294967295.")
      .default(1),
  })
  .superRefine((input, context) => {
    if (input.options.shardColumn) {
      context.addIssue({
        code: "custom",
        path: ["options", "shardColumn"],
        message: "The planner makes the shards: leave out the shard column.",
      });
    }
    if (input.options.simulate) {
      context.addIssue({
        code: "custom",
        path: ["options", "simulate"],
        message: "Simulate a chosen layout in its own analysis, not in a plan.",
      });
    }
    if (typeof input.options.reference === "object") {
      context.addIssue({
        code: "custom",
        path: ["options", "reference"],
        message: "A plan is scored at the pooled optimum or at zero.",
      });
    }
    const groupGenerator = input.generators.find((spec) => spec.generator.startsWith("group-"));
    if (groupGenerator && !input.groupColumn) {
      context.addIssue({
        code: "custom",
        path: ["groupColumn"],
        message: `The ${groupGenerator.generator} generator needs a group column.`,
      });
    }
    if (
      input.groupColumn &&
      [input.options.labelColumn, input.options.idColumn].includes(input.groupColumn)
    ) {
      context.addIssue({
        code: "custom",
        path: ["groupColumn"],
        message: "The group column cannot also be the label or the id column.",
      });
    }
    const names = input.generators.map((spec) => JSON.stringify(spec));
    if (new Set(names).size !== names.length) {
      context.addIssue({
        code: "custom",
        path: ["generators"],
        message: "Each generator and parameter once.",
      });
    }
  });

export type LayoutPlanInput = z.input<typeof layoutPlanSchema>;
export type LayoutPlanRequest = z.output<typeof layoutPlanSchema>;
