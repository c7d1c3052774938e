"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { acceptInvitationAction } from "@/app/invite/[token]/actions";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";

export function AcceptInvitationButton({
  token,
  workspaceName,
}: {
  token: string;
  workspaceName: string;
}) {
  const router = useRouter();
  const [error, setError] = useState<string>();
  const [pending, startTransition] = useTransition();
  return (
    <div className="space-y-3">
      {error ? <Notice tone="error">{error}</Notice> : null}
      <Button
        disabled={pending}
        className="w-full"
        onClick={() =>
          startTransition(async () => {
            const result = await acceptInvitationAction(token);
            if (result.ok) router.push(result.data.landing);
            else setError(result.message);
          })
        }
      >
        {pending ? "Joining…" : `Join ${workspaceName}`}
      </Button>
    </div>
  );
}
