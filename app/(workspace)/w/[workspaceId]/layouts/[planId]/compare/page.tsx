import type { Metadata } from "next";
import Link from "next/link";
import { CandidateScatter } from "@/components/layouts/candidate-scatter";
import { CandidateTable } from "@/components/layouts/candidate-table";
import { LabelMixStrip } from "@/components/layouts/label-mix-strip";
import { PrintButton } from "@/components/reports/print-button";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { Cautions } from "@/components/workspace/cautions";
import { roleAllows } from "@/lib/auth/roles";
import { buildComparisonRows } from "@/lib/layout-plans/comparison-view";
import { PLAN_DEFAULTS } from "@/lib/validation/analysis-options";
import { analyseCandidate } from "../../actions";
import { describePlanInput, loadPlanPage, type PlanPageParams } from "../load-plan";

export const metadata: Metadata = { title: "Compare layouts" };

/**
 * The candidates of one plan side by side (methods.md §8): ρ against weighted JS, the sortable
 * table, each candidate's label mix, the downloads, and "Analyse this layout".
 */
export default async function CompareLayoutsPage({ params }: { params: PlanPageParams }) {
  const { workspace, plan } = await loadPlanPage(params, "/compare");
  const rows = buildComparisonRows(plan);
  const failed = plan.candidates.filter((candidate) => candidate.status === "failed");
  const unfinished = plan.candidates.filter((candidate) =>
    ["queued", "running"].includes(candidate.status),
  ).length;
  const base = `/w/${workspace.id}/layouts/${plan.id}`;
  return (
    <div className="space-y-8">
      <header className="space-y-1">
        <p className="no-print text-sm text-ink-soft">
          <Link className="hover:underline" href={`/w/${workspace.id}/layouts`}>
            Layout plans
          </Link>{" "}
          /{" "}
          <Link className="hover:underline" href={base}>
            Plan
          </Link>{" "}
          / Comparison
        </p>
        <h1 className="text-2xl font-semibold tracking-tight break-words">{plan.title}</h1>
        <p className="text-sm text-ink-soft">
          {describePlanInput(plan)}; every candidate scored for the plan K ={" "}
          {plan.options.localSteps ?? PLAN_DEFAULTS.localSteps}, R ={" "}
          {plan.options.rounds ?? PLAN_DEFAULTS.rounds}, b ={" "}
          {plan.options.batchSize ?? PLAN_DEFAULTS.batchSize}. Ranked by ρ (lower favours local
          updates), then by weighted JS.
        </p>
      </header>
      {unfinished > 0 ? (
        <Notice tone="info">
          {unfinished} candidate{unfinished === 1 ? " is" : "s are"} still being scored;{" "}
          <Link className="underline" href={base}>
            follow the plan
          </Link>
          .
        </Notice>
      ) : null}
      {rows.length === 0 ? (
        <div className="rounded-md border border-dashed border-ink/20 bg-white p-6">
          <p className="font-medium">No candidate has been scored yet.</p>
          <p className="text-sm text-ink-soft">Candidates appear here as the worker scores them.</p>
        </div>
      ) : (
        <>
          <div className="no-print flex flex-wrap gap-2">
            <a
              className={buttonClasses("quiet")}
              href={`/api/workspaces/${workspace.id}/layout-plans/${plan.id}/comparison.json`}
              download
            >
              Download the comparison (JSON)
            </a>
            <PrintButton />
          </div>
          <section aria-labelledby="scatter-heading" className="space-y-2">
            <h2 id="scatter-heading" className="text-lg font-semibold">
              Advice against label skew
            </h2>
            <CandidateScatter rows={rows} />
          </section>
          <section aria-labelledby="table-heading" className="space-y-2">
            <h2 id="table-heading" className="text-lg font-semibold">
              Candidates
            </h2>
            <CandidateTable
              rows={rows}
              workspaceId={workspace.id}
              planId={plan.id}
              analyseCandidate={
                roleAllows(workspace.role, "uploadData")
                  ? analyseCandidate.bind(null, workspace.id, plan.id)
                  : undefined
              }
            />
            <p className="text-sm text-ink-soft">
              Download a candidate&apos;s partition map to use it in a pipeline, or analyse it to
              make it a versioned report others can review.
            </p>
          </section>
          <section aria-labelledby="mix-heading" className="space-y-2">
            <h2 id="mix-heading" className="text-lg font-semibold">
              Label mix per shard
            </h2>
            <p className="text-sm text-ink-soft">
              One column per shard, its classes stacked by share; even columns mean even mixes.
            </p>
            <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
              {rows.map((row) => (
                <LabelMixStrip
                  key={row.ordinal}
                  name={row.name}
                  mix={row.mix}
                  categories={row.categories}
                />
              ))}
            </div>
          </section>
        </>
      )}
      {failed.length > 0 ? (
        <section aria-labelledby="failed-heading" className="space-y-2">
          <h2 id="failed-heading" className="text-lg font-semibold">
            Candidates that could not be made
          </h2>
          <ul className="space-y-1 text-sm">
            {failed.map((candidate) => (
              <li key={candidate.ordinal}>
                <span className="font-mono font-medium">{candidate.name}</span>:{" "}
                {candidate.failureMessage}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      <Cautions sharing />
    </div>
  );
}
