"use client";

import { useState, useTransition } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";

/** The confirmation that names who will be left out. */
export function closeRosterQuestion(waitingFor: string[]): string {
  const names = waitingFor.map((name) => `“${name}”`).join(", ");
  return `Close the roster without ${names}? ${waitingFor.length === 1 ? "It" : "They"} will be listed as missing in the report and can send nothing to this analysis afterwards.`;
}

/** Goes on without the clients that have not sent round 1, after asking, naming them. */
export function CloseRosterButton({
  waitingFor,
  closeRoster,
}: {
  waitingFor: string[];
  /** The route's action, bound to this analysis. */
  closeRoster: () => Promise<ActionResult<{ missing: string[] }>>;
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
            const result = await closeRoster();
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
