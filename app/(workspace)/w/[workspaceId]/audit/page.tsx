import type { Metadata } from "next";
import { AuditFiltersForm } from "@/components/audit/audit-filters-form";
import { AuditTable } from "@/components/audit/audit-table";
import { listAuditActors, listAuditEntries } from "@/db/queries/audit";
import { guardPage } from "@/lib/auth/page-guard";
import { readAuditFilters } from "@/lib/reviews/audit-filters";

export const metadata: Metadata = { title: "Audit log" };

const LOG_LIMIT = 200;

export default async function AuditPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspaceId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { workspaceId } = await params;
  const { workspace } = await guardPage(workspaceId, "readAuditLog", `/w/${workspaceId}/audit`);
  const filters = readAuditFilters(await searchParams);
  const [entries, actors] = await Promise.all([
    listAuditEntries(workspace.id, filters, LOG_LIMIT),
    listAuditActors(workspace.id),
  ]);
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-3xl font-semibold tracking-tight">Audit log</h1>
        <p className="mt-1 max-w-prose text-sm text-ink-soft">
          Who invited, changed or removed members and who asked for or decided a review in{" "}
          {workspace.name}, newest first. Entries are permanent: nobody can edit or delete them.
        </p>
      </div>
      <AuditFiltersForm action={`/w/${workspace.id}/audit`} filters={filters} actors={actors} />
      {entries.length > 0 ? (
        <>
          <AuditTable entries={entries} />
          {entries.length === LOG_LIMIT ? (
            <p className="text-sm text-ink-soft">
              Showing the newest {LOG_LIMIT}; narrow the filters to see older entries.
            </p>
          ) : null}
        </>
      ) : (
        <div className="rounded-lg border border-dashed border-ink/20 bg-white p-8 text-center">
          <p className="font-medium">No entries match.</p>
        </div>
      )}
    </div>
  );
}
