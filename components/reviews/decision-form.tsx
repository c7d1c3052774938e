"use client";

import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import type { ReviewDecisionKind } from "@/lib/reviews/review-state";
import { TextArea } from "@/components/ui/text-area";
import type { ReportReviewActions } from "./report-review-actions";
import { useReviewAction } from "./use-review-action";

const CHOICES: { value: ReviewDecisionKind; label: string; hint: string }[] = [
  {
    value: "endorse",
    label: "Endorse the layout",
    hint: "The verdict and its evidence hold for this plan; the layout can be used.",
  },
  {
    value: "return",
    label: "Return for rework",
    hint: "The layout, the plan or the analysis must change before this report is relied on.",
  },
];

/** Endorse this version's layout or return it for rework, with the reason the referrer will read. */
export function DecisionForm({
  decideReview,
  version,
}: {
  decideReview: ReportReviewActions["decideReview"];
  version: number;
}) {
  const [decision, setDecision] = useState<ReviewDecisionKind>();
  const [reason, setReason] = useState("");
  const { fieldErrors, message, pending, run } = useReviewAction<{ decisionId: string }>();

  function submit(event: FormEvent) {
    event.preventDefault();
    run(
      // An unchosen decision goes to the server as "", which answers with the field's message.
      () => decideReview({ decision: decision ?? "", reason }),
      () => {
        setReason("");
        setDecision(undefined);
        return "Decision recorded; whoever referred the report has been e-mailed.";
      },
    );
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-3" aria-label="Your decision">
      <h3 className="font-semibold">Your decision on version {version}</h3>
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <fieldset className="space-y-2">
        <legend className="sr-only">Decision</legend>
        {CHOICES.map((choice) => (
          <label
            key={choice.value}
            className="flex cursor-pointer gap-3 rounded-md border border-ink/10 p-3 has-checked:border-ink has-checked:bg-paper-deep"
          >
            <input
              type="radio"
              name="review-decision"
              value={choice.value}
              checked={decision === choice.value}
              onChange={() => setDecision(choice.value)}
              className="mt-1 accent-ink"
            />
            <span>
              <span className="block text-sm font-medium">{choice.label}</span>
              <span className="block text-xs text-ink-soft">{choice.hint}</span>
            </span>
          </label>
        ))}
        {fieldErrors.decision ? (
          <p role="alert" className="text-xs font-medium text-cadmium">
            {fieldErrors.decision}
          </p>
        ) : null}
      </fieldset>
      <TextArea
        label="Reason"
        name="decision-reason"
        value={reason}
        onChange={(event) => setReason(event.target.value)}
        error={fieldErrors.reason}
        required
      />
      <Button type="submit" disabled={pending}>
        {pending ? "Recording…" : "Record decision"}
      </Button>
    </form>
  );
}
