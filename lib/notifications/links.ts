import { env } from "@/lib/env";

/**
 * An absolute link into the app for e-mails. A signed-out reader who follows it goes through
 * sign-in (the page guard keeps the path as callbackUrl) and lands on the page.
 */
export function linkTo(path: string): string {
  return new URL(path, env().NEXTAUTH_URL).toString();
}

export function reportPath(workspaceId: string, reportId: string): string {
  return `/w/${workspaceId}/reports/${reportId}`;
}

export function analysisPath(workspaceId: string, analysisId: string): string {
  return `/w/${workspaceId}/analyses/${analysisId}`;
}

/** Preferences are per person; the link names a workspace only to show the page inside it. */
export function notificationSettingsPath(workspaceId: string): string {
  return `/w/${workspaceId}/settings/notifications`;
}
