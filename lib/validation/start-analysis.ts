import { z } from "zod";
import { analysisOptionsSchema, DEFAULT_SIMULATION_BUDGET } from "./analysis-options";

/**
 * What the browser (and later the API) sends to start an analysis: which registered files to read
 * and the engine's options. Given reference weights travel as an uploaded JSON file: with
 * `weightsFileId` set the worker reads that file and uses it as the reference point, and
 * `options.reference` stays "optimum" or "zero" (never inline weights).
 */
export const startAnalysisSchema = z
  .object({
    title: z.string().trim().max(120, "Keep the title under 120 characters.").optional(),
    datasetFileId: z.string().min(1, "Upload or choose a dataset."),
    layoutFileId: z.string().min(1).optional(),
    weightsFileId: z.string().min(1).optional(),
    previousReportId: z.string().min(1).optional(),
    options: analysisOptionsSchema,
  })
  .superRefine((input, context) => {
    if (!input.layoutFileId && !input.options.shardColumn) {
      context.addIssue({
        code: "custom",
        path: ["layoutFileId"],
        message: "Choose a shard column in the dataset or upload a partition map.",
      });
    }
    if (input.layoutFileId && input.options.shardColumn) {
      context.addIssue({
        code: "custom",
        path: ["options", "shardColumn"],
        message: "Use either a shard column or a partition map, not both.",
      });
    }
    // The server's worker is shared by the workspace; larger simulations run with the CLI.
    if (input.options.simulate && input.options.simulate.budget > DEFAULT_SIMULATION_BUDGET) {
      context.addIssue({
        code: "custom",
        path: ["options", "simulate", "budget"],
        message: `The server simulates at most ${DEFAULT_SIMULATION_BUDGET.toExponential().replace("e+", "e")} multiply-adds; ask for less, or run a larger simulation with the CLI on your own machine.`,
      });
    }
    if (typeof input.options.reference === "object") {
      context.addIssue({
        code: "custom",
        path: ["options", "reference"],
        message: "Upload reference weights as a file instead of sending them inline.",
      });
    }
  });

export type StartAnalysisInput = z.input<typeof startAnalysisSchema>;
export type StartAnalysisRequest = z.output<typeof startAnalysisSchema>;

/**
 * What the analysis form sends for the simulation's cost estimate while the user is still choosing:
 * the files and the options so far, without the checks that only matter for starting.
 */
export const simulationEstimateSchema = z.object({
  datasetFileId: z.string().min(1),
  layoutFileId: z.string().min(1).optional(),
  options: analysisOptionsSchema,
});
