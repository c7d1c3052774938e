"use client";

import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { REPORT_SECTIONS } from "@/lib/reviews/anchors";
import { TextArea } from "@/components/ui/text-area";
import type { ReportReviewActions } from "./report-review-actions";
import { useReviewAction } from "./use-review-action";

/** The pin's value while a shard is named by typing its id (a report with too many to list). */
const TYPED_SHARD = "typed-shard";

/**
 * A new thread (optionally pinned to a section or a shard) or, with `parentId`, a reply.
 * Members are mentioned with @ and their full name or e-mail address. `shardIds` null means the
 * report has too many shards for a list: the reader types the id and the server checks it.
 */
export function CommentForm({
  postComment,
  shardIds = [],
  parentId,
}: {
  postComment: ReportReviewActions["postComment"];
  shardIds?: string[] | null;
  parentId?: string;
}) {
  const [body, setBody] = useState("");
  const [pin, setPin] = useState("");
  const [typedShard, setTypedShard] = useState("");
  const { fieldErrors, message, pending, run } = useReviewAction<{ mentioned: number }>();
  const name = parentId ? `reply-${parentId}` : "new-comment";

  function submit(event: FormEvent) {
    event.preventDefault();
    // The pin travels as "section:key" or "shard:id"; a shard id may itself contain ":".
    const chosen = pin === TYPED_SHARD ? `shard:${typedShard}` : pin;
    const separator = chosen.indexOf(":");
    const anchor = chosen
      ? { anchorKind: chosen.slice(0, separator), anchor: chosen.slice(separator + 1) }
      : {};
    run(
      () => postComment({ body, parentId, ...anchor }),
      ({ mentioned }) => {
        setBody("");
        setPin("");
        setTypedShard("");
        return mentioned > 0
          ? `Posted; ${mentioned} mentioned ${mentioned === 1 ? "person was" : "people were"} e-mailed.`
          : undefined;
      },
    );
  }

  return (
    <form
      onSubmit={submit}
      noValidate
      className="space-y-2"
      aria-label={parentId ? "Reply" : "New comment"}
    >
      {message ? <Notice tone={message.tone}>{message.text}</Notice> : null}
      <TextArea
        label={parentId ? "Reply" : "Comment"}
        name={name}
        value={body}
        onChange={(event) => setBody(event.target.value)}
        error={fieldErrors.body}
        placeholder={parentId ? undefined : "Mention someone with @ and their name or e-mail."}
        rows={parentId ? 2 : 3}
      />
      <div className="flex flex-wrap items-end gap-3">
        {parentId ? null : (
          <div className="space-y-1">
            <label htmlFor={`${name}-pin`} className="block text-sm font-medium">
              Pin to
            </label>
            <select
              id={`${name}-pin`}
              value={pin}
              onChange={(event) => setPin(event.target.value)}
              className="rounded-md border border-ink/20 bg-white px-2 py-1.5 text-sm"
            >
              <option value="">The whole report</option>
              <optgroup label="Section">
                {Object.entries(REPORT_SECTIONS).map(([key, label]) => (
                  <option key={key} value={`section:${key}`}>
                    {label}
                  </option>
                ))}
              </optgroup>
              {shardIds === null ? (
                <option value={TYPED_SHARD}>A shard, by its id…</option>
              ) : shardIds.length > 0 ? (
                <optgroup label="Shard">
                  {shardIds.map((shardId) => (
                    <option key={shardId} value={`shard:${shardId}`}>
                      {shardId}
                    </option>
                  ))}
                </optgroup>
              ) : null}
            </select>
            {pin === TYPED_SHARD ? (
              <input
                aria-label="Shard id"
                value={typedShard}
                onChange={(event) => setTypedShard(event.target.value)}
                className="ml-2 w-40 rounded-md border border-ink/20 bg-white px-2 py-1.5 text-sm"
              />
            ) : null}
            {fieldErrors.anchor ? (
              <p role="alert" className="text-xs font-medium text-cadmium">
                {fieldErrors.anchor}
              </p>
            ) : null}
          </div>
        )}
        <Button type="submit" tone={parentId ? "quiet" : "primary"} disabled={pending}>
          {pending ? "Posting…" : parentId ? "Reply" : "Post comment"}
        </Button>
      </div>
    </form>
  );
}
