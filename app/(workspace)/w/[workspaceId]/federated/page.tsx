import type { Metadata } from "next";
import Link from "next/link";
import { FederatedList } from "@/components/federated/federated-list";
import { buttonClasses } from "@/components/ui/button";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { listFederatedAnalysesOf } from "@/lib/federated";

export const metadata: Metadata = { title: "Federated analyses" };

/** The workspace's federated analyses, or what one is and how to start it. */
export default async function FederatedAnalysesPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  const { workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    `/w/${workspaceId}/federated`,
  );
  const analyses = await listFederatedAnalysesOf(workspace.id);
  const canRun = roleAllows(workspace.role, "runAnalysis");
  return (
    <div className="space-y-6">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div className="space-y-1">
          <h1 className="text-2xl font-semibold">Federated analyses</h1>
          <p className="max-w-prose text-ink-soft">
            Reports built from client digests: each client sends counts and sums of its own shards,
            never a row.
          </p>
        </div>
        {canRun ? (
          <Link href={`/w/${workspace.id}/federated/new`} className={buttonClasses("primary")}>
            New federated analysis
          </Link>
        ) : null}
      </header>
      {analyses.length > 0 ? (
        <FederatedList workspaceId={workspace.id} analyses={analyses} />
      ) : (
        <section
          aria-label="No federated analyses yet"
          className="space-y-2 rounded-lg border border-dashed border-ink/20 bg-white p-6"
        >
          <h2 className="font-semibold">No federated analyses yet</h2>
          <p className="max-w-prose text-sm text-ink-soft">
            Name the label, the plan and the clients you expect; each client then gets a key and
            runs <code className="font-mono">npm run digest</code> where its data live. The roster
            shows who has sent what, and the report appears once every client has answered.
          </p>
          {canRun ? null : <p className="text-sm text-ink-soft">Owners and analysts start them.</p>}
        </section>
      )}
    </div>
  );
}
