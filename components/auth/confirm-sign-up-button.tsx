"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";

export function ConfirmSignUpButton({
  confirm,
}: {
  confirm: () => Promise<ActionResult<{ signIn: string }>>;
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
            const result = await confirm();
            if (result.ok) router.push(result.data.signIn);
            else setError(result.message);
          })
        }
      >
        {pending ? "Confirming…" : "Confirm and create my account"}
      </Button>
    </div>
  );
}
