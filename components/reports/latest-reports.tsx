import Link from "next/link";
import type { ReportListItem } from "@/db/queries/reports";
import { formatFigure, formatReportDate } from "@/lib/reports/report-view";
import { VerdictChip } from "./verdict-chip";

/** The newest reports as cards: what was decided, by whom, and when. */
export function LatestReports({
  workspaceId,
  reports,
}: {
  workspaceId: string;
  reports: ReportListItem[];
}) {
  return (
    <ul className="grid gap-4 md:grid-cols-2 lg:grid-cols-3">
      {reports.map((report) => (
        <li key={report.id}>
          <Link
            href={`/w/${workspaceId}/reports/${report.id}`}
            className="block h-full rounded-lg border border-ink/10 bg-white p-5 transition-colors hover:border-ink/30"
          >
            <div className="flex items-start justify-between gap-3">
              <h3 className="font-semibold text-ink">{report.title}</h3>
              <span className="shrink-0 text-xs text-ink-soft">v{report.version}</span>
            </div>
            <div className="mt-3 flex items-center gap-3">
              <VerdictChip verdict={report.verdict} />
              <span className="text-sm tabular-nums text-ink-soft">
                ρ = {formatFigure(report.ratio)}
              </span>
            </div>
            <p className="mt-3 text-xs text-ink-soft">
              {report.datasetRows.toLocaleString("en-US")} rows · {report.shardCount} shards ·{" "}
              {report.authorName} · {formatReportDate(report.createdAt)}
            </p>
          </Link>
        </li>
      ))}
    </ul>
  );
}
