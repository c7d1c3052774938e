import Link from "next/link";
import { stateLabel } from "./federated-states";

// A fixed time zone keeps the server's rendering and the browser's in agreement.
const dateFormat = new Intl.DateTimeFormat("en", { dateStyle: "medium", timeZone: "UTC" });

export interface FederatedListItem {
  id: string;
  title: string;
  state: string;
  reportId: string | null;
  createdAt: Date;
  expectedClients: number;
}

/** The workspace's federated analyses, newest first, each with its state and report. */
export function FederatedList({
  workspaceId,
  analyses,
}: {
  workspaceId: string;
  analyses: FederatedListItem[];
}) {
  return (
    <ul className="divide-y divide-ink/10 rounded-lg border border-ink/10 bg-white">
      {analyses.map((analysis) => (
        <li key={analysis.id} className="flex flex-wrap items-center gap-x-4 gap-y-1 px-4 py-3">
          <Link
            href={`/w/${workspaceId}/federated/${analysis.id}`}
            className="min-w-0 flex-1 font-medium break-words hover:underline"
          >
            {analysis.title}
          </Link>
          <span className="text-sm text-ink-soft tabular-nums">
            {analysis.expectedClients} client{analysis.expectedClients === 1 ? "" : "s"} expected
          </span>
          <span className="rounded-full bg-paper-deep px-2 py-0.5 text-xs">
            {stateLabel(analysis.state)}
          </span>
          {analysis.reportId ? (
            <Link
              href={`/w/${workspaceId}/reports/${analysis.reportId}`}
              className="text-sm text-indigo hover:underline"
            >
              Report
            </Link>
          ) : null}
          <span className="text-xs text-ink-soft">
            {dateFormat.format(new Date(analysis.createdAt))}
          </span>
        </li>
      ))}
    </ul>
  );
}
