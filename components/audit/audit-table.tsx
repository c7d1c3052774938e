import type { AuditEntry } from "@/db/queries/audit";
import { formatReportDate } from "@/lib/reports/report-view";
import { AUDIT_ACTION_LABELS } from "@/lib/reviews/audit-filters";

function describeVersions(versions: unknown): string {
  const list = Array.isArray(versions) ? versions : [];
  return list.length === 1
    ? `its only version (v${list[0]})`
    : `versions ${list.map((v) => `v${v}`).join(", ")}`;
}

/** The start of a comment's earlier text, enough to recognize it in the log. */
function excerpt(text: unknown): string {
  const body = typeof text === "string" ? text.replace(/\s+/g, " ") : "";
  return body.length > 80 ? `${body.slice(0, 80)}…` : body;
}

/** What happened, in words, from an entry's stored details (which vary by kind of event). */
function describeEntry(entry: AuditEntry): string {
  const details = entry.details as Record<string, string | number | string[] | undefined>;
  switch (entry.action) {
    case "member.invited":
      return `${details.email} invited as ${details.role}`;
    case "member.invitation-withdrawn":
      return `invitation of ${details.email} (${details.role}) withdrawn`;
    case "member.role-changed":
      return `${details.email ?? entry.targetId}: ${details.from ?? "?"} → ${details.to}`;
    case "member.removed":
      return `${details.email ?? entry.targetId} (${details.role ?? "?"}) removed`;
    case "report.referred":
      return `"${details.title}" v${details.version}: referred to ${
        Array.isArray(details.reviewers) ? details.reviewers.join(", ") : ""
      }`;
    case "report.endorsed":
    case "report.returned":
      return `"${details.title}" v${details.version}: ${details.reason}`;
    case "report.deleted":
      return `"${details.title}" deleted with ${describeVersions(details.versions)}`;
    case "comment.edited":
      return `"${details.title}" v${details.version}: a comment that read "${excerpt(details.before)}" was rewritten`;
    case "comment.deleted":
      return `"${details.title}" v${details.version}: a comment that read "${excerpt(details.before)}" was deleted`;
    case "api-token.created":
      return `"${details.name}" for ${details.owner}, expires ${details.expiresOn}`;
    case "api-token.revoked":
      return `"${details.name}" of ${details.owner} revoked`;
    case "client-key.issued":
      return `"${details.analysis}": a key for client ${details.client}, expires ${details.expiresOn}`;
    case "client-key.revoked":
      return `"${details.analysis}": a key of client ${details.client} revoked`;
    case "federated.roster-closed": {
      const missing = Array.isArray(details.missing) ? details.missing : [];
      return `"${details.analysis}": round 1 closed${missing.length > 0 ? ` without ${missing.join(", ")}` : ""}`;
    }
    case "federated.cancelled":
      return `"${details.analysis}" stopped`;
  }
}

export function AuditTable({ entries }: { entries: AuditEntry[] }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-ink/10 bg-white">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Audit log, newest first</caption>
        <thead className="bg-paper-deep/60 text-xs text-ink-soft">
          <tr>
            <th scope="col" className="px-3 py-2">
              When
            </th>
            <th scope="col" className="px-3 py-2">
              Event
            </th>
            <th scope="col" className="px-3 py-2">
              By
            </th>
            <th scope="col" className="px-3 py-2">
              What
            </th>
          </tr>
        </thead>
        <tbody>
          {entries.map((entry) => (
            <tr key={entry.id} className="border-t border-ink/5 align-top">
              <td className="px-3 py-2.5 whitespace-nowrap text-ink-soft">
                {formatReportDate(entry.createdAt)}
              </td>
              <td className="px-3 py-2.5 whitespace-nowrap">{AUDIT_ACTION_LABELS[entry.action]}</td>
              <td className="px-3 py-2.5">{entry.actorEmail}</td>
              <td className="px-3 py-2.5">{describeEntry(entry)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
