import type { Metadata } from "next";
import Link from "next/link";
import { NotificationToggles } from "@/components/reviews/notification-toggles";
import { readNotificationSettings } from "@/db/queries/notification-preferences";
import { guardPage } from "@/lib/auth/page-guard";
import { notificationSettingsPath } from "@/lib/notifications/links";
import { updateNotificationSetting } from "./actions";

export const metadata: Metadata = { title: "E-mail notifications" };

export default async function NotificationSettingsPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  const { user, workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    notificationSettingsPath(workspaceId),
  );
  const settings = await readNotificationSettings(user.id);
  return (
    <div className="max-w-2xl space-y-6">
      <div>
        <h1 className="text-3xl font-semibold tracking-tight">E-mail notifications</h1>
        <p className="mt-1 text-sm text-ink-soft">
          Which e-mails Partita sends to {user.email}. The choice applies in every workspace you
          belong to; invitations and sign-in links are always sent.{" "}
          <Link
            href={`/w/${workspace.id}/settings/password`}
            className="text-indigo hover:underline"
          >
            Change your password
          </Link>
        </p>
      </div>
      <NotificationToggles
        initial={settings}
        updateNotificationSetting={updateNotificationSetting.bind(null, workspace.id)}
      />
    </div>
  );
}
