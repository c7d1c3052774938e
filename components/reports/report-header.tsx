import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";
import type { ReportDetail } from "@/db/queries/reports";
import { formatReportDate } from "@/lib/reports/report-view";
import { PrintButton } from "./print-button";

/** Which report this is: title, version and lineage, author, and what can be done with it. */
export function ReportHeader({
  report,
  workspaceId,
  canRunAnalysis,
}: {
  report: ReportDetail;
  workspaceId: string;
  canRunAnalysis: boolean;
}) {
  const base = `/w/${workspaceId}/reports`;
  const exportBase = `/api/workspaces/${workspaceId}/reports/${report.id}`;
  const latest = report.versions[report.versions.length - 1];
  return (
    <header className="space-y-5">
      <div className="space-y-2">
        <nav
          aria-label="Versions of this report"
          className="flex flex-wrap items-center gap-2 text-sm"
        >
          <Link href={base} className="no-print text-ink-soft hover:text-ink">
            Reports
          </Link>
          <span aria-hidden className="no-print text-ink-faint">
            /
          </span>
          <span className="text-ink-soft">
            Version {report.version} of {latest.version}
          </span>
          {report.versions.length > 1 ? (
            <ol className="flex gap-1">
              {report.versions.map((version) => (
                <li key={version.id}>
                  <Link
                    href={`${base}/${version.id}`}
                    aria-current={version.id === report.id ? "page" : undefined}
                    className="rounded px-1.5 py-0.5 text-xs ring-1 ring-ink/15 hover:bg-paper-deep aria-[current=page]:bg-ink aria-[current=page]:text-paper"
                  >
                    v{version.version}
                  </Link>
                </li>
              ))}
            </ol>
          ) : null}
        </nav>
        <h1 className="text-3xl font-semibold tracking-tight text-ink">{report.title}</h1>
        <p className="text-sm text-ink-soft">
          By {report.authorName} · {formatReportDate(report.createdAt)}
          {report.previousVersion ? (
            <>
              {" "}
              · revises{" "}
              <Link href={`${base}/${report.previousVersion.id}`} className="underline">
                version {report.previousVersion.version}
              </Link>
            </>
          ) : null}
          {report.nextVersion ? (
            <>
              {" "}
              · revised by{" "}
              <Link href={`${base}/${report.nextVersion.id}`} className="underline">
                version {report.nextVersion.version}
              </Link>
            </>
          ) : null}
        </p>
        {latest.id !== report.id ? (
          <p className="no-print text-sm">
            <Link href={`${base}/${latest.id}`} className="font-medium text-indigo underline">
              A newer version (v{latest.version}) exists.
            </Link>
          </p>
        ) : null}
      </div>

      <div className="no-print flex flex-wrap gap-2">
        <a href={`${exportBase}/summary.json`} className={buttonClasses("quiet")} download>
          Download JSON
        </a>
        <a href={`${exportBase}/shards.csv`} className={buttonClasses("quiet")} download>
          Download CSV
        </a>
        <PrintButton />
        {report.previousVersion ? (
          <Link
            href={`${base}/compare?a=${report.previousVersion.id}&b=${report.id}`}
            className={buttonClasses("quiet")}
          >
            Compare with v{report.previousVersion.version}
          </Link>
        ) : null}
        {canRunAnalysis ? (
          <Link
            href={
              // A report built from client digests has no dataset file to read again: its clients
              // run the same federated plan again.
              report.summary.digests
                ? `/w/${workspaceId}/federated/new?revise=${report.id}`
                : `/w/${workspaceId}/analyses/new?revise=${report.id}`
            }
            className={buttonClasses("primary")}
          >
            Run again with other parameters
          </Link>
        ) : null}
      </div>
    </header>
  );
}
