import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { AutoRefresh } from "@/components/federated/auto-refresh";
import { IssueKeyForm } from "@/components/federated/client-keys-panel";
import { ClientKeyTable } from "@/components/federated/client-key-table";
import { CloseRosterButton } from "@/components/federated/close-roster-button";
import { DigestUploadForm } from "@/components/federated/digest-upload-form";
import { FederatedOptions } from "@/components/federated/federated-options";
import { isWaiting, stateLabel } from "@/components/federated/federated-states";
import { RosterTable } from "@/components/federated/roster-table";
import { StateStepper } from "@/components/federated/state-stepper";
import { buttonClasses } from "@/components/ui/button";
import { ConfirmActionButton } from "@/components/ui/confirm-action-button";
import { Notice } from "@/components/ui/notice";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { RuleError } from "@/lib/errors";
import { getFederatedStatus, type FederatedStatus } from "@/lib/federated";
import { CLIENT_KEY_LIFETIME_DAYS } from "@/lib/validation/federated-analysis";
import {
  cancelFederated,
  closeFederatedRoster,
  issueFederatedClientKey,
  revokeFederatedClientKey,
  uploadClientDigest,
} from "../actions";

export const metadata: Metadata = { title: "Federated analysis" };

async function loadStatus(workspaceId: string, analysisId: string): Promise<FederatedStatus> {
  try {
    return await getFederatedStatus(workspaceId, analysisId);
  } catch (error) {
    if (error instanceof RuleError && error.status === 404) notFound();
    throw error;
  }
}

/** For a failed analysis, the state it had reached, read from what its clients sent. */
function reachedBeforeFailing(status: FederatedStatus) {
  if (status.encodingHash === null) return "collecting-schemas" as const;
  return status.roster.some((entry) => entry.round === "gradients")
    ? ("collecting-gradients" as const)
    : ("fitting" as const);
}

/**
 * One federated analysis: where it stands, the roster, the clients' keys, offline files, and the
 * report once merged. Refreshes itself while it waits.
 */
export default async function FederatedAnalysisPage({
  params,
}: {
  params: Promise<{ workspaceId: string; federatedId: string }>;
}) {
  const { workspaceId, federatedId } = await params;
  const { workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    `/w/${workspaceId}/federated/${federatedId}`,
  );
  const status = await loadStatus(workspace.id, federatedId);
  const canRun = roleAllows(workspace.role, "runAnalysis");
  const waiting = isWaiting(status.state);
  const clients = status.roster.map((entry) => entry.client);
  const waitingFor = status.roster
    .filter((entry) => entry.round === "none")
    .map((entry) => entry.client);
  const roundOneOpen = status.state === "collecting-schemas";
  const base = `/w/${workspace.id}`;
  return (
    <div className="space-y-8">
      <header className="space-y-1">
        <p className="text-sm text-ink-soft">
          <Link className="hover:underline" href={`${base}/federated`}>
            Federated analyses
          </Link>{" "}
          / Analysis
        </p>
        <h1 className="text-2xl font-semibold tracking-tight break-words">{status.title}</h1>
      </header>

      <section aria-labelledby="federated-state" className="space-y-3">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="federated-state" className="text-lg font-semibold" aria-live="polite">
            {stateLabel(status.state)}
          </h2>
          <AutoRefresh active={waiting} />
        </div>
        <StateStepper
          state={status.state}
          failedAt={status.state === "failed" ? reachedBeforeFailing(status) : undefined}
        />
        {status.state === "fitting" && status.evaluations > 0 ? (
          <p className="text-sm text-ink-soft tabular-nums">
            {status.evaluations} evaluation{status.evaluations === 1 ? "" : "s"} of the fit so far;
            each is one round trip to every client.
          </p>
        ) : null}
        {roundOneOpen && waitingFor.length > 0 ? (
          <p className="text-sm text-ink-soft">
            Waiting for round 1 from {waitingFor.map((name) => `“${name}”`).join(", ")}.
          </p>
        ) : null}
        {canRun && waiting ? (
          <ConfirmActionButton
            label="Cancel the analysis"
            confirmation="Cancel this federated analysis? Its clients are told it ended and no report is made."
            action={cancelFederated.bind(null, workspace.id, status.id)}
          />
        ) : null}
        {status.state === "failed" ? (
          <Notice tone="error">
            <p className="font-medium">What went wrong</p>
            <p className="mt-1 break-words">{status.failureMessage}</p>
          </Notice>
        ) : null}
        {status.reportId ? (
          <Notice tone="success">
            The report is ready.{" "}
            <Link className="font-medium underline" href={`${base}/reports/${status.reportId}`}>
              Open the report
            </Link>
          </Notice>
        ) : null}
      </section>

      <section aria-labelledby="roster-heading" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h2 id="roster-heading" className="text-lg font-semibold">
              Roster
            </h2>
            <p className="text-sm text-ink-soft">
              {status.rosterClosedAt
                ? `Closed; the report lists ${status.missing.length === 0 ? "no client" : status.missing.map((name) => `“${name}”`).join(", ")} as missing.`
                : "Each client's shards and rows, from its round 1; a refusal stays here until the client sends a digest that is accepted."}
            </p>
          </div>
          {canRun && roundOneOpen && waitingFor.length > 0 && waitingFor.length < clients.length ? (
            <CloseRosterButton
              waitingFor={waitingFor}
              closeRoster={closeFederatedRoster.bind(null, workspace.id, status.id)}
            />
          ) : null}
        </div>
        <RosterTable roster={status.roster} missing={status.missing} />
      </section>

      <section aria-labelledby="keys-heading" className="space-y-3">
        <h2 id="keys-heading" className="text-lg font-semibold">
          Client keys
        </h2>
        <p className="max-w-prose text-sm text-ink-soft">
          A key lets one client send its digests to this analysis and read its encoding — nothing
          else: no report, no other analysis.
        </p>
        {canRun && waiting ? (
          <IssueKeyForm
            issueKey={issueFederatedClientKey.bind(null, workspace.id, status.id)}
            clients={clients}
            lifetimes={CLIENT_KEY_LIFETIME_DAYS}
            labelColumn={status.labelColumn}
          />
        ) : null}
        <ClientKeyTable
          keys={status.keys}
          revokeKey={
            canRun ? revokeFederatedClientKey.bind(null, workspace.id, status.id) : undefined
          }
        />
      </section>

      {canRun && waiting ? (
        <section aria-labelledby="offline-heading" className="space-y-3">
          <h2 id="offline-heading" className="text-lg font-semibold">
            Clients without a network path
          </h2>
          <p className="max-w-prose text-sm text-ink-soft">
            A client that cannot reach this server writes its digests as files; upload them here on
            its behalf. Round 2 needs the encoding, available once round 1 is over, and a supplied
            or zero reference point.
          </p>
          {status.encodingHash ? (
            <a
              className={buttonClasses("quiet")}
              href={`/api/workspaces/${workspace.id}/federated/${status.id}/encoding.json`}
              download
            >
              Download the encoding
            </a>
          ) : null}
          <DigestUploadForm
            clients={clients}
            uploadDigest={uploadClientDigest.bind(null, workspace.id, status.id)}
          />
        </section>
      ) : null}

      <FederatedOptions status={status} />
    </div>
  );
}
