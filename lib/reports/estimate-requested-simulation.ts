import "server-only";
import { findDataFile } from "@/db/queries/data-files";
import type { AnalysisOptions } from "@/lib/validation/analysis-options";
import {
  estimateSimulationFromPreviews,
  toSimulationCostView,
  type SimulationCostView,
} from "./simulation-estimate";

export interface SimulationRequest {
  datasetFileId: string;
  layoutFileId?: string;
  options: AnalysisOptions;
}

/**
 * The cost of the simulation a request asks for, from its files' previews in this workspace, with
 * the engine's refusal when it is above the request's budget; null when it asks for none or the
 * previews do not tell enough (then the engine's exact check, after reading, is the only one).
 */
export async function estimateRequestedSimulation(
  workspaceId: string,
  request: SimulationRequest,
): Promise<SimulationCostView | null> {
  const { simulate, ...options } = request.options;
  if (!simulate) return null;
  const [dataset, layout] = await Promise.all([
    findDataFile(workspaceId, request.datasetFileId),
    request.layoutFileId ? findDataFile(workspaceId, request.layoutFileId) : undefined,
  ]);
  // A file of another kind has no say here; queueing refuses it on its own field.
  const estimate = estimateSimulationFromPreviews({
    dataset: dataset?.kind === "dataset" ? dataset.preview : null,
    layout: layout?.kind === "layout" ? layout.preview : null,
    options,
    seeds: simulate.seeds,
    datasetBytes: dataset?.kind === "dataset" ? dataset.sizeBytes : undefined,
  });
  return estimate && toSimulationCostView(estimate, simulate.budget);
}
