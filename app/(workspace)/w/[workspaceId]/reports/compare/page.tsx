import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { BoundCurvesChart } from "@/components/reports/charts/bound-curves-chart";
import { LabelMixChart } from "@/components/reports/charts/label-mix-chart";
import { ComparisonTable } from "@/components/reports/comparison-table";
import { VerdictChip } from "@/components/reports/verdict-chip";
import { Cautions } from "@/components/workspace/cautions";
import { findReport, type ReportDetail } from "@/db/queries/reports";
import { guardPage } from "@/lib/auth/page-guard";
import { computeBoundCurves, readBoundInputs } from "@/lib/reports/bound-curves";
import { compareReports } from "@/lib/reports/report-comparison";
import { buildLabelMix, formatFigure, formatReportDate } from "@/lib/reports/report-view";

export const metadata: Metadata = { title: "Compare reports" };

/** Shards per label-mix chart here: two charts share the width, so fewer bars than on a report. */
const LABEL_MIX_CAP = 20;

const single = (value: string | string[] | undefined) => (Array.isArray(value) ? value[0] : value);

export default async function CompareReportsPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspaceId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { workspaceId } = await params;
  const query = await searchParams;
  const a = single(query.a);
  const b = single(query.b);
  const returnTo = `/w/${workspaceId}/reports/compare${a && b ? `?a=${encodeURIComponent(a)}&b=${encodeURIComponent(b)}` : ""}`;
  const { workspace } = await guardPage(workspaceId, "readWorkspace", returnTo);
  const listHref = `/w/${workspace.id}/reports`;
  if (!a || !b) {
    return (
      <div className="space-y-4">
        <h1 className="text-3xl font-semibold tracking-tight">Compare reports</h1>
        <p className="text-ink-soft">
          Pick two reports to compare: tick them in the{" "}
          <Link href={listHref} className="text-indigo underline">
            list of reports
          </Link>
          .
        </p>
      </div>
    );
  }
  const [left, right] = await Promise.all([
    findReport(workspace.id, a),
    findReport(workspace.id, b),
  ]);
  if (!left || !right) notFound();
  const rows = compareReports(left, right);
  const label = (report: ReportDetail) => `${report.title} (v${report.version})`;
  const differing = rows.filter((row) => row.differs).length;
  return (
    <div className="space-y-8">
      <div className="space-y-1">
        <Link href={listHref} className="no-print text-sm text-ink-soft hover:text-ink">
          Reports
        </Link>
        <h1 className="text-3xl font-semibold tracking-tight">Compare reports</h1>
        <p className="text-sm text-ink-soft">
          {differing === 0
            ? "The two reports show the same figures."
            : `${differing} of ${rows.length} figures differ; they are marked below.`}
        </p>
      </div>

      <div className="grid gap-4 md:grid-cols-2">
        {[left, right].map((report, index) => (
          <section
            key={`${report.id}-${index}`}
            aria-label={`Report ${index === 0 ? "A" : "B"}`}
            className="rounded-lg border border-ink/10 bg-white p-5"
          >
            <p className="text-xs font-semibold tracking-wide text-ink-soft uppercase">
              Report {index === 0 ? "A" : "B"}
            </p>
            <h2 className="mt-1 text-lg font-semibold">
              <Link href={`${listHref}/${report.id}`} className="hover:underline">
                {report.title}
              </Link>
            </h2>
            <p className="text-xs text-ink-soft">
              Version {report.version} · {report.authorName} · {formatReportDate(report.createdAt)}
            </p>
            <div className="mt-3 flex items-center gap-3">
              <VerdictChip verdict={report.verdict} />
              <span className="text-sm tabular-nums">
                ρ = {formatFigure(report.summary.advice.ratio)}
              </span>
            </div>
            <p className="mt-2 text-xs text-ink-soft">
              Plan: M = {report.summary.advice.participants}, K = {report.summary.advice.localSteps}
              , R = {report.summary.advice.rounds}, b = {report.summary.advice.batchSize}
            </p>
          </section>
        ))}
      </div>

      <ComparisonTable rows={rows} headings={[`A: ${label(left)}`, `B: ${label(right)}`]} />

      <section aria-labelledby="compare-label-mix" className="space-y-3">
        <h2 id="compare-label-mix" className="text-xl font-semibold">
          Label mix per shard
        </h2>
        <p className="max-w-prose text-sm text-ink-soft">
          Each bar is one shard&apos;s mix of labels beside the whole dataset&apos;s, for each
          report.
        </p>
        <div className="grid gap-6 md:grid-cols-2">
          {[left, right].map((report, index) => {
            const mix = buildLabelMix(report.summary, LABEL_MIX_CAP, report.shardCount);
            return (
              <figure
                key={`${report.id}-${index}`}
                className="rounded-lg border border-ink/10 bg-white p-4"
              >
                <figcaption className="mb-2 text-sm font-medium">
                  {index === 0 ? "A" : "B"}: {label(report)}
                </figcaption>
                {mix.bars.length > 1 ? (
                  <LabelMixChart
                    bars={mix.bars}
                    categories={mix.categories}
                    ordered={report.summary.dataset.task === "regression"}
                    label={`Stacked bars: label mix of report ${index === 0 ? "A" : "B"}'s shards beside the pooled mix.`}
                  />
                ) : (
                  <p className="text-sm text-ink-soft">This report has no shards to show.</p>
                )}
                {mix.capped ? (
                  <p className="mt-2 text-xs text-ink-soft">
                    The {mix.shownShards} most divergent of {mix.totalShards} shards.
                  </p>
                ) : null}
              </figure>
            );
          })}
        </div>
      </section>
      <section aria-labelledby="compare-bounds" className="space-y-3">
        <h2 id="compare-bounds" className="text-xl font-semibold">
          Bounds against local steps, for each plan
        </h2>
        <p className="max-w-prose text-sm text-ink-soft">
          Each report&apos;s three convergence bounds as its local steps per round grow, under its
          own plan; the dashed vertical line is that plan&apos;s K, the solid one where local SGD
          starts to beat minibatch SGD.
        </p>
        <div className="grid gap-6 md:grid-cols-2">
          {[left, right].map((report, index) => {
            const curves = computeBoundCurves(readBoundInputs(report.summary));
            const { participants, localSteps, rounds, batchSize } = report.summary.advice;
            return (
              <figure
                key={`${report.id}-${index}`}
                className="min-w-0 rounded-lg border border-ink/10 bg-white p-4"
              >
                <figcaption className="mb-2 text-sm font-medium">
                  {index === 0 ? "A" : "B"}: {label(report)} — plan M = {participants}, K ={" "}
                  {localSteps}, R = {rounds}, b = {batchSize}
                </figcaption>
                {curves.drawable ? (
                  <BoundCurvesChart
                    points={curves.points}
                    planLocalSteps={localSteps}
                    crossoverLocalSteps={curves.crossoverLocalSteps}
                    label={`Line chart: the bounds of report ${index === 0 ? "A" : "B"} against local steps, its plan's K = ${localSteps} marked.`}
                  />
                ) : (
                  <p className="text-sm text-ink-soft">
                    The bounds are zero or undefined for this report, so there is nothing to draw.
                  </p>
                )}
              </figure>
            );
          })}
        </div>
      </section>
      <Cautions sharing />
    </div>
  );
}
