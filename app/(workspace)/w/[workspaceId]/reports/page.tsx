import type { Metadata } from "next";
import Link from "next/link";
import { ReportFiltersForm } from "@/components/reports/report-filters-form";
import { ReportList } from "@/components/reports/report-list";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { Cautions } from "@/components/workspace/cautions";
import { listReportAuthors, listReportPage } from "@/db/queries/reports";
import { findReviewStates } from "@/db/queries/reviews";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { decodeReportCursor } from "@/lib/reports/report-cursor";
import { hasReportFilters, readReportFilters } from "@/lib/reports/report-filters";

export const metadata: Metadata = { title: "Reports" };

/** Reports per page: a page costs the same with a thousand reports as with ten. */
const PAGE_SIZE = 50;

/** The list's URL with the same filters, starting after `cursor` (the first page without one). */
function pageHref(
  base: string,
  query: Record<string, string | string[] | undefined>,
  cursor?: string,
) {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (key !== "after" && key !== "deleted" && typeof value === "string") params.set(key, value);
  }
  if (cursor) params.set("after", cursor);
  const search = params.toString();
  return `${base}/reports${search ? `?${search}` : ""}`;
}

export default async function ReportsPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspaceId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { workspaceId } = await params;
  const { workspace } = await guardPage(workspaceId, "readWorkspace", `/w/${workspaceId}/reports`);
  const query = await searchParams;
  const filters = readReportFilters(query);
  // Set by the delete control after it deleted a report, to say what went.
  const deletedTitle = typeof query.deleted === "string" ? query.deleted : undefined;
  const filtered = hasReportFilters(filters);
  // A stale or hand-edited cursor shows the first page rather than an error.
  const after = typeof query.after === "string" ? decodeReportCursor(query.after) : undefined;
  const [{ reports, nextCursor }, authors] = await Promise.all([
    listReportPage(workspace.id, filters, PAGE_SIZE, after),
    listReportAuthors(workspace.id),
  ]);
  const reviewStates = await findReviewStates(
    workspace.id,
    reports.map((report) => report.id),
  );
  const canRun = roleAllows(workspace.role, "runAnalysis");
  const base = `/w/${workspace.id}`;
  const hasAny = reports.length > 0 || authors.length > 0;
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1 className="text-3xl font-semibold tracking-tight">Reports</h1>
          <p className="mt-1 text-sm text-ink-soft">
            Every analysis of {workspace.name}, newest first. Reports never change; a re-run with
            other parameters is a new version of the same report.
          </p>
        </div>
        {canRun ? (
          <div className="flex flex-wrap gap-2">
            <Link href={`${base}/federated/new`} className={buttonClasses("quiet")}>
              New federated analysis
            </Link>
            <Link href={`${base}/analyses/new`} className={buttonClasses("primary")}>
              New analysis
            </Link>
          </div>
        ) : null}
      </div>

      {deletedTitle ? (
        <Notice tone="success">
          Deleted “{deletedTitle}” with all its versions. The audit log keeps a record of it.
        </Notice>
      ) : null}

      {hasAny ? (
        <ReportFiltersForm action={`${base}/reports`} filters={filters} authors={authors} />
      ) : null}

      {reports.length > 0 ? (
        <>
          <ReportList
            workspaceId={workspace.id}
            reports={reports.map((report) => ({
              ...report,
              createdAt: report.createdAt.toISOString(),
              reviewState: reviewStates.get(report.id) ?? { kind: "not-referred" },
            }))}
          />
          {after || nextCursor ? (
            <nav aria-label="Pages of reports" className="no-print flex flex-wrap gap-3 text-sm">
              {after ? (
                <Link href={pageHref(base, query)} className={buttonClasses("quiet")}>
                  Newest reports
                </Link>
              ) : null}
              {nextCursor ? (
                <Link href={pageHref(base, query, nextCursor)} className={buttonClasses("quiet")}>
                  Older reports
                </Link>
              ) : null}
            </nav>
          ) : null}
        </>
      ) : filtered && hasAny ? (
        <div className="rounded-lg border border-dashed border-ink/20 bg-white p-8 text-center">
          <p className="font-medium">No report matches these filters.</p>
          <Link
            href={`${base}/reports`}
            className="mt-2 inline-block text-sm text-indigo underline"
          >
            Clear the filters
          </Link>
        </div>
      ) : (
        <div className="rounded-lg border border-dashed border-ink/20 bg-white p-8 text-center">
          <p className="font-medium">No reports yet.</p>
          {canRun ? (
            <>
              <p className="mx-auto mt-1 max-w-prose text-sm text-ink-soft">
                Upload a labelled dataset and its layout, state your training plan, and Partita
                turns the analysis into a report here.
              </p>
              <Link href={`${base}/analyses/new`} className={`${buttonClasses("primary")} mt-4`}>
                New analysis
              </Link>
            </>
          ) : (
            <p className="mx-auto mt-1 max-w-prose text-sm text-ink-soft">
              Reports appear here once an analyst or owner of this workspace runs an analysis.
            </p>
          )}
        </div>
      )}
      <Cautions sharing />
    </div>
  );
}
