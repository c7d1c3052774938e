"use client";

import { useState, useTransition } from "react";
import { revokeApiTokenAction } from "@/app/(workspace)/w/[workspaceId]/tokens/actions";

/** Revokes one token after a confirmation; pipelines using it fail from the next request on. */
export function RevokeTokenButton({
  workspaceId,
  tokenId,
  name,
}: {
  workspaceId: string;
  tokenId: string;
  name: string;
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
          if (!window.confirm(`Revoke “${name}”? Pipelines using it stop working at once.`)) return;
          startTransition(async () => {
            const result = await revokeApiTokenAction(workspaceId, tokenId);
            setError(result.ok ? undefined : result.message);
          });
        }}
        className="rounded px-2 py-1 text-sm text-cadmium hover:bg-cadmium-soft"
      >
        Revoke
      </button>
    </span>
  );
}
