import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { cache } from "react";
import { DeleteReportControl } from "@/components/reports/delete-report-control";
import { DigestProvenance } from "@/components/reports/digest-provenance";
import { KeyFigures } from "@/components/reports/key-figures";
import { MethodsSection } from "@/components/reports/methods-section";
import { PreprocessingNotes } from "@/components/reports/preprocessing-notes";
import { ReportEvidence } from "@/components/reports/report-evidence";
import { ReportHeader } from "@/components/reports/report-header";
import { ReportProvenance } from "@/components/reports/report-provenance";
import { RunNotes } from "@/components/reports/run-notes";
import { ShardTable } from "@/components/reports/shard-table";
import { SimulationSection } from "@/components/reports/simulation-section";
import { ReviewPanel } from "@/components/reviews/review-panel";
import { ReviewStateChip } from "@/components/reviews/review-state-chip";
import { VerdictPanel } from "@/components/reports/verdict-panel";
import { Cautions } from "@/components/workspace/cautions";
import { listAnalysisParts } from "@/db/queries/analysis-parts";
import { findRunCircumstances } from "@/db/queries/analyses";
import { findReport, findShardPage, listShardIds } from "@/db/queries/reports";
import { findReviewOverview, listReviewerCandidates } from "@/db/queries/reviews";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { describeRun } from "@/lib/reports/run-notes";
import { readShardTableView, SHARD_PAGE_SIZE } from "@/lib/reports/shard-table-view";
import type { SearchParams } from "@/lib/validation/url-filters";
import {
  decideReview,
  postComment,
  removeComment,
  requestReview,
  reviseComment,
} from "./review-actions";
import { deleteReport } from "./delete-actions";

type PageProps = {
  params: Promise<{ workspaceId: string; reportId: string }>;
  searchParams: Promise<SearchParams>;
};

/** Above this many shards a comment is pinned to a shard by typing its id instead of picking it. */
const PICKABLE_SHARDS = 200;

/** Guarded read shared by the page and its metadata, so one request queries once. */
const loadReport = cache(async (workspaceId: string, reportId: string) => {
  const { user, workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    `/w/${workspaceId}/reports/${reportId}`,
  );
  const report = await findReport(workspace.id, reportId);
  if (!report) notFound();
  return { user, workspace, report };
});

export async function generateMetadata({ params }: PageProps): Promise<Metadata> {
  const { workspaceId, reportId } = await params;
  const { report } = await loadReport(workspaceId, reportId);
  return { title: `${report.title} (v${report.version})` };
}

// A4 with margins that leave 182 mm (about 688 CSS px) of width: charts are at most 680 px wide.
const PRINT_PAGE = "@page { size: A4; margin: 14mm; }";

export default async function ReportPage({ params, searchParams }: PageProps) {
  const { workspaceId, reportId } = await params;
  const { user, workspace, report } = await loadReport(workspaceId, reportId);
  const { summary } = report;
  const shardView = readShardTableView(await searchParams);
  const [review, reviewerCandidates, shardPage, shardIds, parts, circumstances] =
    await Promise.all([
    findReviewOverview(workspace.id, report.id),
    listReviewerCandidates(workspace.id),
    findShardPage(report.id, shardView),
    listShardIds(report.id, PICKABLE_SHARDS),
    listAnalysisParts(report.analysisId),
    findRunCircumstances(workspace.id, report.analysisId),
  ]);
  return (
    <article
      className="space-y-10"
      // Backgrounds carry meaning here (verdict bands, chart keys), so print them as on screen.
      style={{ printColorAdjust: "exact", WebkitPrintColorAdjust: "exact" }}
    >
      <style>{PRINT_PAGE}</style>
      <ReportHeader
        report={report}
        workspaceId={workspace.id}
        canRunAnalysis={roleAllows(workspace.role, "runAnalysis")}
      />
      <a href="#review" className="inline-block" title="Go to the review of this version">
        <ReviewStateChip state={review.state} />
      </a>
      <VerdictPanel summary={summary} />
      <KeyFigures summary={summary} shardCount={report.shardCount} />
      {summary.digests ? <DigestProvenance digests={summary.digests} /> : null}
      <ReportProvenance report={report} />
      <RunNotes notes={describeRun({ parts, ...circumstances })} />
      <Cautions sharing digests={summary.digests !== undefined} />
      <ReportEvidence summary={summary} shardCount={report.shardCount} />
      <SimulationSection summary={summary} />
      <section aria-labelledby="shards-heading" className="space-y-3 print:break-before-page">
        <h2 id="shards-heading" className="text-xl font-semibold text-ink">
          Per-shard table
        </h2>
        <p className="max-w-prose text-sm text-ink-soft">
          Every shard&apos;s size, label-mix divergences, gradient figures at the reference point
          and feature shift, {SHARD_PAGE_SIZE} shards a page (printed: the page on screen); the CSV
          download holds the whole table.
        </p>
        <ShardTable
          rows={shardPage.rows}
          view={shardView}
          matching={shardPage.matching}
          total={report.shardCount}
          anchor="shards-heading"
          task={summary.dataset.task}
        />
      </section>
      <PreprocessingNotes summary={summary} />
      <MethodsSection summary={summary} />
      <ReviewPanel
        actions={{
          requestReview: requestReview.bind(null, workspace.id, report.id),
          decideReview: decideReview.bind(null, workspace.id, report.id),
          postComment: postComment.bind(null, workspace.id, report.id),
          reviseComment: reviseComment.bind(null, workspace.id, report.id),
          removeComment: removeComment.bind(null, workspace.id, report.id),
        }}
        report={{
          id: report.id,
          version: report.version,
          shardIds,
        }}
        overview={review}
        candidates={reviewerCandidates}
        viewerId={user.id}
        can={{
          request: roleAllows(workspace.role, "requestReview"),
          comment: roleAllows(workspace.role, "commentOnReport"),
          decide: roleAllows(workspace.role, "decideReview"),
        }}
      />
      {roleAllows(workspace.role, "deleteReport") ? (
        <DeleteReportControl
          workspaceId={workspace.id}
          deleteReport={deleteReport.bind(null, workspace.id, report.id)}
          title={report.title}
          versionCount={report.versions.length}
        />
      ) : null}
    </article>
  );
}
