import { findUserById } from "@/db/queries/users";
import { findWorkspaceForMember } from "@/db/queries/workspaces";
import { deliverNotification, type DeliveryOutcome } from "./deliver";
import { analysisPath, linkTo, notificationSettingsPath, reportPath } from "./links";
import { analysisEndedMessage } from "./messages";

/**
 * Runs shorter than this end while the person who started them is still likely watching the
 * progress page; only longer runs are worth an e-mail.
 */
export const LONG_ANALYSIS_SECONDS = 60;

export type EndedRun =
  { outcome: "succeeded"; reportId: string } | { outcome: "failed"; message: string };

/**
 * E-mails the person who started a long analysis when it succeeds or fails, if they still belong
 * to the workspace and have not turned "analysis finished" e-mails off. Never throws.
 */
export async function notifyAnalysisEnded(input: {
  workspaceId: string;
  analysisId: string;
  title: string;
  startedBy: string;
  seconds: number;
  run: EndedRun;
}): Promise<DeliveryOutcome | "short" | "not-a-member"> {
  if (input.seconds < LONG_ANALYSIS_SECONDS) return "short";
  try {
    const [person, membership] = await Promise.all([
      findUserById(input.startedBy),
      findWorkspaceForMember(input.startedBy, input.workspaceId),
    ]);
    if (!person || !membership) return "not-a-member";
    const path =
      input.run.outcome === "succeeded"
        ? reportPath(input.workspaceId, input.run.reportId)
        : analysisPath(input.workspaceId, input.analysisId);
    return await deliverNotification({
      workspaceId: input.workspaceId,
      recipient: { userId: person.id, email: person.email },
      kind: "analysis-finished",
      message: analysisEndedMessage({
        title: input.title,
        outcome: input.run.outcome,
        minutes: input.seconds / 60,
        url: linkTo(path),
        failureMessage: input.run.outcome === "failed" ? input.run.message : undefined,
        settingsUrl: linkTo(notificationSettingsPath(input.workspaceId)),
      }),
    });
  } catch (error) {
    console.error(
      `[notifications] analysis ${input.analysisId} e-mail failed:`,
      error instanceof Error ? error.message : error,
    );
    return "failed";
  }
}
