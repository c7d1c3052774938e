import type { Metadata } from "next";
import { FederatedForm } from "@/components/federated/federated-form";
import { Notice } from "@/components/ui/notice";
import { DEFAULT_MINIMUM_SHARD_ROWS } from "@/lib/analysis";
import { guardPage } from "@/lib/auth/page-guard";
import { findPlanToRevise } from "@/lib/federated";
import { emptyFederatedForm, federatedFormFrom } from "@/lib/validation/federated-form";
import { createFederatedFromForm } from "../actions";

export const metadata: Metadata = { title: "New federated analysis" };

export default async function NewFederatedAnalysisPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspaceId: string }>;
  searchParams: Promise<{ revise?: string | string[] }>;
}) {
  const { workspaceId } = await params;
  const query = await searchParams;
  // "Run again" on a report built from digests: that analysis's plan, as the report's next version.
  const revise = typeof query.revise === "string" ? query.revise : undefined;
  await guardPage(
    workspaceId,
    "runAnalysis",
    `/w/${workspaceId}/federated/new${revise ? `?revise=${encodeURIComponent(revise)}` : ""}`,
  );
  const earlier = revise ? await findPlanToRevise(workspaceId, revise) : undefined;
  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <h1 className="text-2xl font-semibold">
          {earlier ? "Run a federated analysis again" : "New federated analysis"}
        </h1>
        <p className="max-w-prose text-ink-soft">
          {earlier
            ? "The earlier analysis's options, reference point, plan and clients are filled in; change what you need. Its clients send their digests again, and the report becomes the next version of the earlier one."
            : "When rows cannot leave their clients, each client runs one command where its data live and sends digests — counts and sums per shard, never a row. Partita merges them into the same report as if the rows had been pooled."}
        </p>
      </header>
      {revise && !earlier ? (
        <Notice tone="error">
          The report to start from is not a federated report of this workspace; the form starts
          empty.
        </Notice>
      ) : null}
      <FederatedForm
        workspaceId={workspaceId}
        createFederated={createFederatedFromForm.bind(null, workspaceId)}
        initialValues={
          earlier && revise
            ? federatedFormFrom(earlier, revise)
            : emptyFederatedForm(DEFAULT_MINIMUM_SHARD_ROWS)
        }
      />
    </div>
  );
}
