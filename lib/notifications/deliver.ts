import { RateLimiterRes, sharedLimiter } from "@/lib/rate-limits/shared-limiter";
import { wantsEmail } from "@/db/queries/notification-preferences";
import type { NotificationKind } from "@/db/schema";
import { queueMail } from "@/lib/mail";
import type { NotificationMessage } from "./messages";

/**
 * Limits on notification e-mail, so a loop of comments or requests cannot flood an inbox or the
 * relay: per recipient within a workspace, and per workspace overall. Counted in PostgreSQL, so the
 * app processes and the worker share them.
 */
const perRecipient = sharedLimiter({
  keyPrefix: "mail-recipient",
  points: 20,
  duration: 10 * 60,
});
const perWorkspace = sharedLimiter({
  keyPrefix: "mail-workspace",
  points: 300,
  duration: 60 * 60,
});

export type DeliveryOutcome = "queued" | "turned-off" | "rate-limited" | "failed";

/**
 * Queues one notification in the outbox unless the recipient turned this kind off or a limit is spent. Never
 * throws: the action that caused the e-mail already happened, so a mail problem is logged (without
 * the address) and reported as an outcome rather than undoing or failing the action.
 */
export async function deliverNotification(input: {
  workspaceId: string;
  recipient: { userId: string; email: string };
  kind: NotificationKind;
  message: NotificationMessage;
}): Promise<DeliveryOutcome> {
  try {
    if (!(await wantsEmail(input.recipient.userId, input.kind))) return "turned-off";
    await Promise.all([
      perRecipient.consume(`${input.workspaceId}:${input.recipient.userId}`),
      perWorkspace.consume(input.workspaceId),
    ]);
    await queueMail({ to: input.recipient.email, ...input.message });
    return "queued";
  } catch (error) {
    if (error instanceof RateLimiterRes) {
      console.warn(`[notifications] ${input.kind} e-mail skipped: rate limit reached`);
      return "rate-limited";
    }
    console.error(
      `[notifications] ${input.kind} e-mail failed:`,
      error instanceof Error ? error.message : error,
    );
    return "failed";
  }
}
