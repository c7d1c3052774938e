import type { Metadata } from "next";
import { FederatedForm } from "@/components/federated/federated-form";
import { DEFAULT_MINIMUM_SHARD_ROWS } from "@/lib/analysis";
import { guardPage } from "@/lib/auth/page-guard";
import { emptyFederatedForm } from "@/lib/validation/federated-form";

export const metadata: Metadata = { title: "New federated analysis" };

export default async function NewFederatedAnalysisPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  await guardPage(workspaceId, "runAnalysis", `/w/${workspaceId}/federated/new`);
  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <h1 className="text-2xl font-semibold">New federated analysis</h1>
        <p className="max-w-prose text-ink-soft">
          When rows cannot leave their clients, each client runs one command where its data live and
          sends digests — counts and sums per shard, never a row. Partita merges them into the same
          report as if the rows had been pooled.
        </p>
      </header>
      <FederatedForm
        workspaceId={workspaceId}
        initialValues={emptyFederatedForm(DEFAULT_MINIMUM_SHARD_ROWS)}
      />
    </div>
  );
}
