"use client";

import { ActionThenGoButton } from "@/components/ui/action-then-go-button";
import type { ActionResult } from "@/lib/actions/result";

export function AcceptInvitationButton({
  accept,
  workspaceName,
}: {
  /** The route's action, bound to the invitation's token. */
  accept: () => Promise<ActionResult<{ landing: string }>>;
  workspaceName: string;
}) {
  return (
    <ActionThenGoButton
      action={accept}
      destination={(joined) => joined.landing}
      label={`Join ${workspaceName}`}
      pendingLabel="Joining…"
    />
  );
}
