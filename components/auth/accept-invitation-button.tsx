"use client";

import { acceptInvitationAction } from "@/app/invite/[token]/actions";
import { ActionThenGoButton } from "@/components/ui/action-then-go-button";

export function AcceptInvitationButton({
  token,
  workspaceName,
}: {
  token: string;
  workspaceName: string;
}) {
  return (
    <ActionThenGoButton
      action={() => acceptInvitationAction(token)}
      destination={(joined) => joined.landing}
      label={`Join ${workspaceName}`}
      pendingLabel="Joining…"
    />
  );
}
