import { z } from "zod";
import { REVIEW_DECISION_KINDS } from "@/db/schema/reviews";

export const reviewRequestSchema = z.object({
  reviewerIds: z
    .array(z.string().min(1))
    .min(1, "Choose at least one reviewer to refer it to.")
    .max(20, "Ask at most 20 reviewers at once."),
  note: z.string().trim().max(2000, "Keep the note under 2,000 characters.").optional(),
});

const commentBody = z
  .string()
  .trim()
  .min(1, "Write a comment first.")
  .max(10_000, "Keep a comment under 10,000 characters.");

export const commentSchema = z
  .object({
    body: commentBody,
    parentId: z.string().min(1).optional(),
    anchorKind: z.enum(["section", "shard"]).optional(),
    anchor: z.string().trim().min(1).max(200).optional(),
  })
  .refine((value) => (value.anchorKind === undefined) === (value.anchor === undefined), {
    message: "A pinned comment needs both what it is pinned to and its name.",
    path: ["anchor"],
  });

/** A comment's new text; where it sits (thread, pin) does not change. */
export const commentEditSchema = z.object({
  commentId: z.string().min(1),
  body: commentBody,
});

export const decisionSchema = z.object({
  decision: z.enum(REVIEW_DECISION_KINDS, {
    message: "Choose whether to endorse the layout or return it for rework.",
  }),
  reason: z
    .string()
    .trim()
    .min(1, "Give a reason: the analyst reads it in the e-mail.")
    .max(5000, "Keep the reason under 5,000 characters."),
});
