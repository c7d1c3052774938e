import type { SimulationCostView } from "@/lib/reports/simulation-estimate";

/**
 * The simulation's estimated cost before the run (methods.md §7), how long that is roughly, and a
 * warning in the server's words when it is above the budget.
 */
export function SimulationCost({
  id,
  view,
  status,
  showRefusal,
}: {
  id: string;
  /** The server's estimate; null when the choices do not tell enough yet. */
  view: SimulationCostView | null | undefined;
  status: "pending" | "error" | "success";
  /** False once the server has refused the run on the field: its message says the same. */
  showRefusal: boolean;
}) {
  if (status === "error") {
    return (
      <p id={id} className="text-xs text-ink-soft">
        The cost estimate could not be fetched; the server still checks the cost when you start.
      </p>
    );
  }
  if (!view) {
    return (
      <p id={id} className="text-xs text-ink-soft">
        {status === "pending"
          ? "Estimating the cost…"
          : "The cost estimate appears once the label, the features, the shards and the plan are chosen."}
      </p>
    );
  }
  return (
    <div id={id} className="space-y-2 text-sm">
      <p>
        <span className="font-medium">Estimated cost: about {view.amount} multiply-adds</span>{" "}
        <span className="text-ink-soft">
          (3 algorithms × (8 + S) runs × R·M·K·b·(d+1)·C, with M = {view.participants}, d + 1 ≈{" "}
          {view.width} and C ≈ {view.weightRows}), so {view.time} on one core: the steps at roughly{" "}
          {view.rate} multiply-adds a second, plus the passes over all rows that draw the curves.
        </span>
      </p>
      <p className="text-xs text-ink-soft">
        Counted from the {view.wholeFiles ? "files' previews" : "first rows of the files"}; the
        server checks the exact cost once it has read the whole dataset.
      </p>
      {view.refusal && showRefusal ? (
        <p
          role="alert"
          className="rounded-md border border-cadmium/40 bg-cadmium-soft px-3 py-2 text-ink"
        >
          {view.refusal}
        </p>
      ) : null}
    </div>
  );
}
