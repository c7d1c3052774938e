"use client";

import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { useReviewAction } from "@/components/reviews/use-review-action";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";

/**
 * Owners' way to delete a report: a closed disclosure first, then the title typed to confirm, since
 * the deletion takes every version with its reviews and cannot be undone.
 */
export function DeleteReportControl({
  workspaceId,
  title,
  versionCount,
  deleteReport,
}: {
  workspaceId: string;
  title: string;
  versionCount: number;
  /** The route's action, bound to the workspace and report. */
  deleteReport: (input: { confirmTitle: string }) => Promise<ActionResult<{ title: string }>>;
}) {
  const router = useRouter();
  const [confirmTitle, setConfirmTitle] = useState("");
  const { fieldErrors, message, pending, run } = useReviewAction<{ title: string }>();

  function submit(event: FormEvent) {
    event.preventDefault();
    run(
      () => deleteReport({ confirmTitle }),
      (deleted) => {
        router.replace(`/w/${workspaceId}/reports?deleted=${encodeURIComponent(deleted.title)}`);
        return undefined;
      },
    );
  }

  const versions = versionCount === 1 ? "its only version" : `all ${versionCount} versions`;
  return (
    <details className="no-print rounded-lg border border-cadmium/30 bg-white p-4">
      <summary className="cursor-pointer text-sm font-medium text-cadmium">
        Delete this report…
      </summary>
      <form onSubmit={submit} noValidate className="mt-4 space-y-3" aria-label="Delete report">
        <p className="text-sm text-ink-soft">
          Deletes {versions} of this report with their review requests, comments and decisions. The
          uploaded files stay, and the audit log keeps a record of the deletion. This cannot be
          undone.
        </p>
        {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
        <Field
          label={`Type the title to confirm: ${title}`}
          name="confirmTitle"
          value={confirmTitle}
          onChange={(event) => setConfirmTitle(event.target.value)}
          error={fieldErrors.confirmTitle}
          autoComplete="off"
        />
        <Button type="submit" tone="danger" disabled={pending || confirmTitle.trim() === ""}>
          {pending ? "Deleting…" : "Delete report"}
        </Button>
      </form>
    </details>
  );
}
