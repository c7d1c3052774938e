"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";

/**
 * A full-width button that runs a server action and then opens the page the action's result names;
 * a refusal is shown above it and the button can be pressed again.
 */
export function ActionThenGoButton<TData>({
  action,
  destination,
  label,
  pendingLabel,
}: {
  action: () => Promise<ActionResult<TData>>;
  /** The path to open once the action succeeded. */
  destination: (data: TData) => string;
  label: string;
  pendingLabel: string;
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
            const result = await action();
            if (result.ok) router.push(destination(result.data));
            else setError(result.message);
          })
        }
      >
        {pending ? pendingLabel : label}
      </Button>
    </div>
  );
}
