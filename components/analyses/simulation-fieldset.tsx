"use client";

import { useEffect } from "react";
import { useFormContext } from "react-hook-form";
import { FormField, WHOLE_NUMBER } from "@/components/analyses/analysis-fields";
import { useFieldError } from "@/components/analyses/analysis-form-hooks";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { SimulationCost } from "@/components/analyses/simulation-cost";
import { useSimulationEstimate } from "@/components/analyses/use-simulation-estimate";
import { FieldMessage } from "@/components/ui/field-parts";

/** "Also simulate" (methods.md §7): the switch, the number of seeds and the estimated cost. */
export function SimulationFieldset({
  workspaceId,
  values,
}: {
  workspaceId: string;
  values: AnalysisFormValues;
}) {
  const { register, clearErrors } = useFormContext<AnalysisFormValues>();
  const estimate = useSimulationEstimate(workspaceId, values);
  const error = useFieldError("options.simulate");
  // The server's over-budget refusal sits on this field until the next submit; once a changed plan
  // is estimated within the budget it no longer holds, so it goes.
  const withinBudget = estimate.data ? estimate.data.refusal === null : false;
  useEffect(() => {
    if (withinBudget) clearErrors("options.simulate");
  }, [withinBudget, clearErrors]);
  return (
    <fieldset
      className="space-y-3 rounded-md border border-ink/10 bg-white p-4"
      aria-describedby={error ? "simulate-error" : undefined}
    >
      <legend className="sr-only">Simulation</legend>
      <label className="flex cursor-pointer items-start gap-3">
        <input
          type="checkbox"
          className="mt-1 accent-indigo"
          aria-describedby="simulate-detail"
          {...register("options.simulate.enabled")}
        />
        <span>
          <span className="block text-sm font-medium">Also simulate</span>
          <span id="simulate-detail" className="block text-xs text-ink-soft">
            Runs minibatch SGD, local SGD and drift-corrected local updates on your shards under
            this plan, on the reference model&apos;s objective, and reports the outcome beside the
            bounds.
          </span>
        </span>
      </label>
      {values.options.simulate.enabled ? (
        <>
          <div className="max-w-xs">
            <FormField
              id="simulation-seeds"
              label="Seeds (S)"
              path="options.simulate.seeds"
              {...WHOLE_NUMBER}
              hint="Re-runs of each algorithm's chosen step size; the report shows their spread."
            />
          </div>
          <SimulationCost
            id="simulation-cost"
            view={estimate.data}
            status={estimate.status}
            showRefusal={!error}
          />
        </>
      ) : null}
      <FieldMessage id="simulate" error={error} />
    </fieldset>
  );
}
