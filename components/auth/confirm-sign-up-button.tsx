"use client";

import { ActionThenGoButton } from "@/components/ui/action-then-go-button";
import type { ActionResult } from "@/lib/actions/result";

export function ConfirmSignUpButton({
  confirm,
}: {
  confirm: () => Promise<ActionResult<{ signIn: string }>>;
}) {
  return (
    <ActionThenGoButton
      action={confirm}
      destination={(confirmed) => confirmed.signIn}
      label="Confirm and create my account"
      pendingLabel="Confirming…"
    />
  );
}
