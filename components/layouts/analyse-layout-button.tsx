"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { analyseCandidate } from "@/app/(workspace)/w/[workspaceId]/layouts/actions";
import { Button } from "@/components/ui/button";

/**
 * "Analyse this layout": registers the candidate's map as a layout file and opens the new-analysis
 * form with the dataset, the map and the plan's options filled in.
 */
export function AnalyseLayoutButton({
  workspaceId,
  planId,
  ordinal,
  name,
}: {
  workspaceId: string;
  planId: string;
  ordinal: number;
  name: string;
}) {
  const router = useRouter();
  const [pending, startTransition] = useTransition();
  const [error, setError] = useState<string>();
  const analyse = () => {
    setError(undefined);
    startTransition(async () => {
      const result = await analyseCandidate(workspaceId, planId, ordinal);
      if (!result.ok) {
        setError(result.message);
        return;
      }
      router.push(`/w/${workspaceId}/analyses/new?layoutPlan=${planId}&candidate=${ordinal}`);
    });
  };
  return (
    <span className="inline-flex flex-col gap-1">
      <Button
        type="button"
        tone="quiet"
        className="px-2 py-1 text-xs"
        onClick={analyse}
        disabled={pending}
        aria-label={`Analyse the layout ${name}`}
      >
        {pending ? "Opening…" : "Analyse"}
      </Button>
      {error ? (
        <span role="alert" className="text-xs text-cadmium">
          {error}
        </span>
      ) : null}
    </span>
  );
}
