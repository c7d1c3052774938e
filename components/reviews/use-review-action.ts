"use client";

import { useState, useTransition } from "react";
import type { ActionResult } from "@/lib/actions/result";

/**
 * Runs a review action from a form: keeps its field errors and a message, and calls `onSuccess`
 * (e.g. to clear the form). The action revalidates the report page, so the panel redraws itself.
 */
export function useReviewAction<TData>() {
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: "error" | "success"; text: string }>();
  const [pending, startTransition] = useTransition();

  function run(
    action: () => Promise<ActionResult<TData>>,
    onSuccess: (data: TData) => string | undefined,
  ) {
    startTransition(async () => {
      const result = await action();
      if (result.ok) {
        setFieldErrors({});
        const text = onSuccess(result.data);
        setMessage(text ? { tone: "success", text } : undefined);
        return;
      }
      setFieldErrors(result.fieldErrors);
      setMessage(
        Object.keys(result.fieldErrors).length
          ? undefined
          : { tone: "error", text: result.message },
      );
    });
  }

  return { fieldErrors, message, pending, run };
}
