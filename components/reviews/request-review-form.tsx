"use client";

import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { TextArea } from "@/components/ui/text-area";
import type { ReportReviewActions } from "./report-review-actions";
import { useReviewAction } from "./use-review-action";

export type ReviewerOption = { userId: string; label: string; detail: string };

/** Refer this version to owners/reviewers; each gets an e-mail with a link to it. */
export function RequestReviewForm({
  requestReview,
  candidates,
}: {
  requestReview: ReportReviewActions["requestReview"];
  candidates: ReviewerOption[];
}) {
  const [chosen, setChosen] = useState<string[]>([]);
  const [note, setNote] = useState("");
  const { fieldErrors, message, pending, run } = useReviewAction<{ asked: number }>();

  function submit(event: FormEvent) {
    event.preventDefault();
    run(
      () => requestReview({ reviewerIds: chosen, note: note || undefined }),
      ({ asked }) => {
        setChosen([]);
        setNote("");
        return `Referred to ${asked} ${asked === 1 ? "person" : "people"}; they have been e-mailed.`;
      },
    );
  }

  if (candidates.length === 0) {
    return (
      <p className="text-sm text-ink-soft">
        Nobody else can be asked: invite a reviewer on the Members page first.
      </p>
    );
  }
  return (
    <form onSubmit={submit} noValidate className="space-y-3" aria-label="Refer for review">
      <h3 className="font-semibold">Refer for review</h3>
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <fieldset className="space-y-1">
        <legend className="text-sm font-medium">Reviewers</legend>
        {candidates.map((candidate) => (
          <label key={candidate.userId} className="flex items-center gap-2 text-sm">
            <input
              type="checkbox"
              className="h-4 w-4 accent-ink"
              checked={chosen.includes(candidate.userId)}
              onChange={(event) =>
                setChosen((current) =>
                  event.target.checked
                    ? [...current, candidate.userId]
                    : current.filter((id) => id !== candidate.userId),
                )
              }
            />
            <span>
              {candidate.label} <span className="text-ink-soft">({candidate.detail})</span>
            </span>
          </label>
        ))}
        {fieldErrors.reviewerIds ? (
          <p role="alert" className="text-xs font-medium text-cadmium">
            {fieldErrors.reviewerIds}
          </p>
        ) : null}
      </fieldset>
      <TextArea
        label="Note to the reviewers (optional)"
        name="review-note"
        value={note}
        onChange={(event) => setNote(event.target.value)}
        error={fieldErrors.note}
      />
      <Button type="submit" disabled={pending}>
        {pending ? "Sending…" : "Refer"}
      </Button>
    </form>
  );
}
