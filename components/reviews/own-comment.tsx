"use client";

import { useState, type FormEvent, type ReactNode } from "react";
import { Button } from "@/components/ui/button";
import { ConfirmActionButton } from "@/components/ui/confirm-action-button";
import { Notice } from "@/components/ui/notice";
import { TextArea } from "@/components/ui/text-area";
import type { ReportReviewActions } from "./report-review-actions";
import { useReviewAction } from "./use-review-action";

/**
 * A comment its reader wrote: its text with Edit and Delete beside it. Edit swaps the text for a
 * form holding it (Escape or Cancel leaves it unchanged); Delete asks first.
 */
export function OwnComment({
  actions,
  commentId,
  body,
  children,
}: {
  actions: Pick<ReportReviewActions, "reviseComment" | "removeComment">;
  commentId: string;
  body: string;
  /** The comment as everyone sees it. */
  children: ReactNode;
}) {
  const [editing, setEditing] = useState(false);
  const [draft, setDraft] = useState(body);
  const { fieldErrors, message, pending, run } = useReviewAction<{ mentioned: number }>();
  const name = `edit-${commentId}`;

  function save(event: FormEvent) {
    event.preventDefault();
    run(
      () => actions.reviseComment({ commentId, body: draft }),
      ({ mentioned }) => {
        setEditing(false);
        return mentioned > 0
          ? `Saved; ${mentioned} newly mentioned ${mentioned === 1 ? "person was" : "people were"} e-mailed.`
          : undefined;
      },
    );
  }

  function cancel() {
    setDraft(body);
    setEditing(false);
  }

  if (editing) {
    return (
      <form
        onSubmit={save}
        onKeyDown={(event) => {
          if (event.key === "Escape") cancel();
        }}
        noValidate
        className="space-y-2"
        aria-label="Edit comment"
      >
        {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
        <TextArea
          label="Your comment"
          name={name}
          value={draft}
          onChange={(event) => setDraft(event.target.value)}
          error={fieldErrors.body}
          autoFocus
        />
        <div className="flex gap-2">
          <Button type="submit" tone="primary" disabled={pending}>
            {pending ? "Saving…" : "Save"}
          </Button>
          <Button type="button" tone="quiet" onClick={cancel} disabled={pending}>
            Cancel
          </Button>
        </div>
      </form>
    );
  }
  return (
    <div>
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      {children}
      <div className="no-print mt-1 flex items-center gap-1">
        <button
          type="button"
          onClick={() => setEditing(true)}
          className="rounded px-2 py-1 text-sm text-indigo hover:bg-indigo-soft"
        >
          Edit
        </button>
        <ConfirmActionButton
          label="Delete"
          confirmation="Delete your comment? Replies to it stay; the audit log keeps what it said."
          action={() => actions.removeComment(commentId)}
        />
      </div>
    </div>
  );
}
