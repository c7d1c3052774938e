"use client";

import { useState, useTransition } from "react";
import { closeFederatedRoster } from "@/app/(workspace)/w/[workspaceId]/federated/actions";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";

/** The confirmation that names who will be left out. */
export function closeRosterQuestion(waitingFor: string[]): string {
  const names = waitingFor.map((name) => `“${name}”`).join(", ");
  return `Close the roster without ${names}? ${waitingFor.length === 1 ? "It" : "They"} will be listed as missing in the report and can send nothing to this analysis afterwards.`;
}

/** Goes on without the clients that have not sent round 1, after asking, naming them. */
export function CloseRosterButton({
  workspaceId,
  analysisId,
  waitingFor,
}: {
  workspaceId: string;
  analysisId: string;
  waitingFor: string[];
}) {
  const [error, setError] = useState<string>();
  const [pending, startTransition] = useTransition();
  return (
    <div className="space-y-2">
      <Button
        type="button"
        tone="danger"
        disabled={pending}
        onClick={() => {
          if (!window.confirm(closeRosterQuestion(waitingFor))) return;
          startTransition(async () => {
            const result = await closeFederatedRoster(workspaceId, analysisId);
            setError(result.ok ? undefined : result.message);
          });
        }}
      >
        {pending ? "Closing…" : "Close the roster"}
      </Button>
      {error ? <Notice tone="error">{error}</Notice> : null}
    </div>
  );
}
