import { AnalysisInputError } from "@/lib/analysis/errors";
import { checkSimulationBudget } from "@/lib/analysis/simulation/simulate-plan";
import {
  describeSimulationCost,
  SIMULATION_MULTIPLY_ADDS_PER_SECOND,
  type SimulationEstimate,
} from "@/lib/reports/simulation-estimate";
import { formatFigure } from "@/lib/reports/report-view";

/** The engine's own refusal for this estimate, so the form warns in the words the server uses. */
function describeRefusal(estimate: SimulationEstimate, budget: number): string | null {
  try {
    checkSimulationBudget(estimate.cost, budget, estimate.plan);
    return null;
  } catch (error) {
    if (error instanceof AnalysisInputError) return error.message;
    throw error;
  }
}

/**
 * The simulation's estimated cost before the run (methods.md §7), how long that is roughly, and a
 * warning in the server's words when it is above the budget.
 */
export function SimulationCost({
  id,
  estimate,
  budget,
}: {
  id: string;
  estimate: SimulationEstimate | null;
  budget: number;
}) {
  if (!estimate) {
    return (
      <p id={id} className="text-xs text-ink-soft">
        The cost estimate appears once the label, the shards and the plan are chosen.
      </p>
    );
  }
  const { amount, time, overBudget } = describeSimulationCost(estimate.cost, budget);
  const refusal = overBudget ? describeRefusal(estimate, budget) : null;
  return (
    <div id={id} className="space-y-2 text-sm">
      <p>
        <span className="font-medium">Estimated cost: about {amount} multiply-adds</span>{" "}
        <span className="text-ink-soft">
          (3 algorithms × (8 + S) runs × R·M·K·b·(d+1)·C, with M = {estimate.plan.participants}, d +
          1 ≈ {estimate.width} and C ≈ {estimate.weightRows}), so {time} at the roughly{" "}
          {formatFigure(SIMULATION_MULTIPLY_ADDS_PER_SECOND, 1)} a second one core manages.
        </span>
      </p>
      <p className="text-xs text-ink-soft">
        Counted from the {estimate.wholeFiles ? "files' previews" : "first rows of the files"}; the
        server checks the exact cost once it has read the whole dataset.
      </p>
      {refusal ? (
        <p
          role="alert"
          className="rounded-md border border-cadmium/40 bg-cadmium-soft px-3 py-2 text-ink"
        >
          Above the server&apos;s budget of {formatFigure(budget, 2)} multiply-adds, so it would be
          refused: {refusal}.
        </p>
      ) : null}
    </div>
  );
}
