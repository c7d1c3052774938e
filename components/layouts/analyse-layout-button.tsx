"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { Button } from "@/components/ui/button";
import type { ActionResult } from "@/lib/actions/result";

/**
 * "Analyse this layout": registers the candidate's map as a layout file and opens the new-analysis
 * form with the dataset, the map and the plan's options filled in.
 */
export function AnalyseLayoutButton({
  analyse,
  newAnalysisUrl,
  name,
}: {
  /** Registers the map (the route's action, bound to the candidate). */
  analyse: () => Promise<ActionResult<unknown>>;
  /** The new-analysis form filled in for the candidate, opened once the map is registered. */
  newAnalysisUrl: string;
  name: string;
}) {
  const router = useRouter();
  const [pending, startTransition] = useTransition();
  const [error, setError] = useState<string>();
  const open = () => {
    setError(undefined);
    startTransition(async () => {
      const result = await analyse();
      if (!result.ok) {
        setError(result.message);
        return;
      }
      router.push(newAnalysisUrl);
    });
  };
  return (
    <span className="inline-flex flex-col gap-1">
      <Button
        type="button"
        tone="quiet"
        className="px-2 py-1 text-xs"
        onClick={open}
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
