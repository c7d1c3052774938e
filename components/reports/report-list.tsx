"use client";

import Link from "next/link";
import { useState } from "react";
import { ReviewStateChip } from "@/components/reviews/review-state-chip";
import { buttonClasses } from "@/components/ui/button";
import { formatFigure, formatReportDate } from "@/lib/reports/report-view";
import { VerdictChip } from "./verdict-chip";
import type { ReportListItem } from "@/db/queries/reports";
import type { ReviewState } from "@/lib/reviews/review-state";

/** A row of the list as the browser gets it: dates travel as ISO strings. */
export type ReportListEntry = Omit<ReportListItem, "createdAt"> & {
  createdAt: string;
  reviewState: ReviewState;
};

/**
 * The reports as a table; ticking two of them enables the comparison. A third tick replaces the
 * oldest choice, so the selection is always the last two picked.
 */
export function ReportList({
  workspaceId,
  reports,
}: {
  workspaceId: string;
  reports: ReportListEntry[];
}) {
  const [picked, setPicked] = useState<string[]>([]);
  const base = `/w/${workspaceId}/reports`;
  const toggle = (id: string) =>
    setPicked((current) =>
      current.includes(id) ? current.filter((entry) => entry !== id) : [...current, id].slice(-2),
    );
  const ready = picked.length === 2;
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3 text-sm">
        {ready ? (
          <Link
            href={`${base}/compare?a=${picked[0]}&b=${picked[1]}`}
            className={buttonClasses("primary")}
          >
            Compare the two selected
          </Link>
        ) : (
          <span
            className={`${buttonClasses("quiet")} cursor-default opacity-60`}
            aria-disabled="true"
          >
            Compare the two selected
          </span>
        )}
        <span className="text-ink-soft" aria-live="polite">
          {ready
            ? "Two reports selected."
            : `Tick two reports to compare them (${picked.length} of 2).`}
        </span>
      </div>
      <div className="relative overflow-x-auto rounded-lg border border-ink/10 bg-white">
        <table className="w-full text-left text-sm">
          <caption className="sr-only">Reports, newest first</caption>
          <thead className="bg-paper-deep/60 text-xs text-ink-soft">
            <tr>
              <th scope="col" className="w-10 px-3 py-2">
                <span className="sr-only">Compare</span>
              </th>
              <th scope="col" className="px-3 py-2">
                Report
              </th>
              <th scope="col" className="px-3 py-2">
                Verdict
              </th>
              <th scope="col" className="px-3 py-2">
                Review
              </th>
              <th scope="col" className="px-3 py-2 text-right">
                ρ
              </th>
              <th scope="col" className="px-3 py-2 text-right">
                Rows · shards
              </th>
              <th scope="col" className="px-3 py-2">
                Author
              </th>
              <th scope="col" className="px-3 py-2">
                Created
              </th>
            </tr>
          </thead>
          <tbody>
            {reports.map((report) => (
              <tr key={report.id} className="border-t border-ink/5 align-top">
                <td className="px-3 py-2.5">
                  <input
                    type="checkbox"
                    checked={picked.includes(report.id)}
                    onChange={() => toggle(report.id)}
                    aria-label={`Compare ${report.title}, version ${report.version}`}
                    className="h-4 w-4 accent-ink"
                  />
                </td>
                <td className="px-3 py-2.5">
                  <Link
                    href={`${base}/${report.id}`}
                    className="font-medium text-ink hover:underline"
                  >
                    {report.title}
                  </Link>
                  <div className="text-xs text-ink-soft">
                    Version {report.version}
                    {report.latestVersion > report.version
                      ? ` · newer version ${report.latestVersion} exists`
                      : ""}
                  </div>
                </td>
                <td className="px-3 py-2.5">
                  <VerdictChip verdict={report.verdict} />
                </td>
                <td className="px-3 py-2.5">
                  <ReviewStateChip state={report.reviewState} />
                </td>
                <td className="px-3 py-2.5 text-right tabular-nums">
                  {formatFigure(report.ratio)}
                </td>
                <td className="px-3 py-2.5 text-right tabular-nums">
                  {report.datasetRows.toLocaleString("en-US")} ·{" "}
                  {report.shardCount.toLocaleString("en-US")}
                </td>
                <td className="px-3 py-2.5">{report.authorName}</td>
                <td className="px-3 py-2.5 whitespace-nowrap text-ink-soft">
                  {formatReportDate(new Date(report.createdAt))}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
