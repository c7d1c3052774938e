"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { useAnalysisFormActions } from "@/components/analyses/analysis-form-actions";
import {
  toStartAnalysisInput,
  type AnalysisFormValues,
} from "@/components/analyses/analysis-form-schema";

/**
 * The server's estimate of the simulation's cost for the current choices, fetched while the
 * simulation is asked for. The server words it from the files' previews (the engine's simulation
 * module runs threads and stays out of the browser); the last estimate stays up while the next
 * one loads.
 */
export function useSimulationEstimate(workspaceId: string, values: AnalysisFormValues) {
  const { estimateSimulation } = useAnalysisFormActions();
  const request = values.options.simulate.enabled ? toStartAnalysisInput(values) : null;
  return useQuery({
    queryKey: ["simulation-estimate", workspaceId, request],
    queryFn: async () => {
      const result = await estimateSimulation(request!);
      if (!result.ok) throw new Error(result.message);
      return result.data;
    },
    enabled: request !== null,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    retry: false,
  });
}
