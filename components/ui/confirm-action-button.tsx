"use client";

import { useState, useTransition } from "react";
import type { ActionResult } from "@/lib/actions/result";

/**
 * A small destructive button that asks first, then runs a server action (bound to its arguments by
 * the server component that renders it) and shows the action's refusal beside it.
 */
export function ConfirmActionButton({
  label,
  confirmation,
  action,
  onDone,
}: {
  label: string;
  confirmation: string;
  action: () => Promise<ActionResult>;
  /** Called once the action succeeded, for state the page keeps in the browser. */
  onDone?: () => void;
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
          if (!window.confirm(confirmation)) return;
          startTransition(async () => {
            const result = await action();
            setError(result.ok ? undefined : result.message);
            if (result.ok) onDone?.();
          });
        }}
        className="rounded px-2 py-1 text-sm text-cadmium hover:bg-cadmium-soft"
      >
        {label}
      </button>
    </span>
  );
}
