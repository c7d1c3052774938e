"use client";

import { useState, useTransition } from "react";
import { withdrawInvitationAction } from "@/app/(workspace)/w/[workspaceId]/members/actions";

/** Withdraws one pending invitation after a confirmation; its e-mailed link stops working. */
export function WithdrawInvitationButton({
  workspaceId,
  invitationId,
  email,
}: {
  workspaceId: string;
  invitationId: string;
  email: string;
}) {
  const [error, setError] = useState<string>();
  const [pending, startTransition] = useTransition();
  return (
    <span className="inline-flex items-center gap-2">
      {error ? <span className="text-xs text-cadmium">{error}</span> : null}
      <button
        type="button"
        disabled={pending}
        onClick={() => {
          if (!window.confirm(`Withdraw the invitation of ${email}? Its link stops working.`)) {
            return;
          }
          startTransition(async () => {
            const result = await withdrawInvitationAction(workspaceId, invitationId);
            setError(result.ok ? undefined : result.message);
          });
        }}
        className="rounded px-2 py-1 text-sm text-cadmium hover:bg-cadmium-soft"
      >
        Withdraw
      </button>
    </span>
  );
}
