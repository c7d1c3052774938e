import type { PartitionSummary } from "@/lib/analysis/browser";
import { formatFigure } from "@/lib/reports/report-view";
import {
  ALGORITHM_LABELS,
  describeComparison,
  describeStepSizeEdges,
  SUBOPTIMALITY_FLOOR,
  toCurvePoints,
} from "@/lib/reports/simulation-view";
import { SimulationCurvesChart } from "./charts/simulation-curves-chart";
import { ChartEmptyState } from "./evidence-section";
import { VerdictChip } from "./verdict-chip";

type Simulation = NonNullable<PartitionSummary["simulation"]>;

/** "2.1×10⁻⁵ (1.9×10⁻⁵–2.4×10⁻⁵)": the mean over the seeds and their range. */
function formatFinal({ final, finalMin, finalMax }: Simulation["algorithms"][number]): string {
  if (final === null) return "—";
  return `${formatFigure(final)} (${formatFigure(finalMin)}–${formatFigure(finalMax)})`;
}

/** The re-runs' seeds: seed + 1 … seed + S (methods.md §7). */
function describeSeedRange({ seed, seeds }: Simulation): string {
  return seeds === 1 ? `${seed + 1}` : `${seed + 1}…${seed + seeds}`;
}

/**
 * methods.md §7 in the report: the three algorithms run on the reference objective over the real
 * shards under the plan — their curves with the seed band, each one's step size and final figure,
 * and the empirical verdict beside the bound-based one. Only when the analysis simulated.
 */
export function SimulationSection({ summary }: { summary: PartitionSummary }) {
  const { simulation, advice } = summary;
  if (!simulation) return null;
  const series = simulation.algorithms.map((result) => ({
    name: result.name,
    label: ALGORITHM_LABELS[result.name],
    ...toCurvePoints(result),
  }));
  const clamped = series.some((entry) => entry.clamped);
  const comparison = describeComparison(simulation.verdict, advice.verdict, simulation.ratio);
  const edges = describeStepSizeEdges(simulation.algorithms);
  return (
    <section aria-labelledby="simulation-heading" className="space-y-4 print:break-before-page">
      <div className="space-y-1">
        <h2 id="simulation-heading" className="text-xl font-semibold text-ink">
          Simulation on your shards
        </h2>
        <p className="max-w-prose text-sm text-ink-soft">
          Minibatch SGD, local SGD and drift-corrected local updates ran on the reference
          model&apos;s objective over your shards, under your plan (M = {advice.participants}, K ={" "}
          {advice.localSteps}, R = {advice.rounds}, b = {advice.batchSize}). Each kept the best of
          eight step sizes on one seed (trying up to three more beyond the grid while the best lay
          at its end), then re-ran it on {simulation.seeds}{" "}
          {simulation.seeds === 1 ? "seed" : "seeds"}.
        </p>
      </div>

      <div
        className={`space-y-3 rounded-lg border p-5 print:break-inside-avoid ${simulation.agreesWithBounds ? "border-ink/10 bg-white" : "border-cadmium/50 bg-cadmium-soft/40"}`}
      >
        <dl className="grid grid-cols-[auto_1fr] items-center gap-x-4 gap-y-2 text-sm">
          <dt className="text-ink-soft">From the bounds</dt>
          <dd className="flex flex-wrap items-center gap-2">
            <VerdictChip verdict={advice.verdict} />
            <span className="tabular-nums">ρ = {formatFigure(advice.ratio)}</span>
          </dd>
          <dt className="text-ink-soft">From the simulation</dt>
          <dd className="flex flex-wrap items-center gap-2">
            <VerdictChip verdict={simulation.verdict} />
            <span className="tabular-nums">ρ_sim = {formatFigure(simulation.ratio)}</span>
          </dd>
        </dl>
        <p role="note" className="max-w-prose text-sm text-ink">
          {comparison}
        </p>
        <p className="max-w-prose text-xs text-ink-soft">
          ρ_sim is local SGD&apos;s final suboptimality over minibatch SGD&apos;s (means over the
          seeds), read with the same thresholds as ρ: at most ½ favours local updates, at least 2
          large minibatches.
        </p>
      </div>

      <div className="rounded-lg border border-ink/10 bg-white p-5 print:break-inside-avoid print:border-ink/20">
        <h3 id="simulation-curves-heading" className="text-base font-semibold text-ink">
          Suboptimality against rounds
        </h3>
        <p className="mt-1 max-w-prose text-sm text-ink-soft">
          How far each algorithm&apos;s model is from the optimum of the reference objective after
          every round, on a logarithmic scale; lower is better. Each line is the mean over the
          seeds; the shaded band around it, edged by thin dashed lines, spans the best and worst
          seed.
        </p>
        {/* The whole card's width on screen; within an A4 page's text width in print. */}
        <div className="mt-4 print:max-w-[680px]">
          {series.some((entry) => entry.points.length > 0) ? (
            <SimulationCurvesChart
              series={series}
              rounds={advice.rounds}
              label={`Line chart on a logarithmic scale: suboptimality against rounds for ${series.map((entry) => entry.label).join(", ")}, each with its seeds' range shaded.`}
            />
          ) : (
            <ChartEmptyState>
              Every algorithm diverged at every step size, so there is no curve to draw.
            </ChartEmptyState>
          )}
        </div>
        {clamped ? (
          <p className="mt-3 text-xs text-ink-soft">
            A logarithmic scale cannot show zero or less, so values below{" "}
            {formatFigure(SUBOPTIMALITY_FLOOR)} (rounding noise around the optimum, which can dip
            just below zero) are drawn at {formatFigure(SUBOPTIMALITY_FLOOR)}.
          </p>
        ) : null}
      </div>

      <div className="relative overflow-x-auto rounded-md border border-ink/10 bg-white">
        <table className="w-full text-left text-sm">
          <caption className="sr-only">
            Each algorithm&apos;s chosen step size, final suboptimality and diverged seeds
          </caption>
          <thead className="bg-paper-deep/60 text-xs">
            <tr>
              <th scope="col" className="px-3 py-2">
                Algorithm
              </th>
              <th scope="col" className="px-3 py-2">
                Step size η
              </th>
              <th scope="col" className="px-3 py-2">
                Final F − F*, mean (min–max)
              </th>
              <th scope="col" className="px-3 py-2">
                Diverged seeds
              </th>
            </tr>
          </thead>
          <tbody>
            {simulation.algorithms.map((result) => (
              <tr key={result.name} className="border-t border-ink/5 print:break-inside-avoid">
                <th scope="row" className="px-3 py-2 font-medium">
                  {ALGORITHM_LABELS[result.name]}
                </th>
                <td className="px-3 py-2 tabular-nums">
                  {result.stepSize === null
                    ? "none: every step size diverged"
                    : formatFigure(result.stepSize)}
                  {result.stepSizeAtEdge ? (
                    <span className="ml-2 rounded-sm bg-cadmium-soft px-1.5 py-0.5 text-xs text-ink">
                      at the grid&apos;s edge
                    </span>
                  ) : null}
                </td>
                <td className="px-3 py-2 tabular-nums">{formatFinal(result)}</td>
                <td className="px-3 py-2 tabular-nums">
                  {result.divergedSeeds} of {simulation.seeds}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>

      {edges.length > 0 ? (
        <div role="note" aria-label="Step sizes at the grid's edge" className="space-y-1 text-sm">
          {edges.map((sentence) => (
            <p key={sentence} className="max-w-prose text-ink">
              {sentence}
            </p>
          ))}
        </div>
      ) : null}

      <aside
        aria-label="Simulation caveat"
        className="rounded-md border border-ink/10 bg-white p-4 text-sm text-ink-soft"
      >
        <p>
          <strong className="text-ink">A convex proxy, not your network.</strong> The simulation
          trains the reference model — a convex{" "}
          {summary.dataset.task === "regression" ? "least-squares" : "multinomial logistic"} model
          on your features — not the network your team will train. It tests whether the constants
          the bounds hide change the advice on your split; a deep network can still behave
          differently.
        </p>
        <p className="mt-2 text-xs">
          Draws from {simulation.generator}, seed {simulation.seed} for the step-size search and{" "}
          {describeSeedRange(simulation)} for the re-runs; the same input, plan and seed give the
          same curves on every machine. Estimated cost {formatFigure(simulation.cost)} multiply-adds
          (budget {formatFigure(simulation.budget)}).
        </p>
      </aside>
    </section>
  );
}
