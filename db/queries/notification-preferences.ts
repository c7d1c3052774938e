import "server-only";
import { and, eq } from "drizzle-orm";
import { db } from "@/db/client";
import { NOTIFICATION_KINDS, notificationPreferences, type NotificationKind } from "@/db/schema";

export type NotificationSettings = Record<NotificationKind, boolean>;

/** The user's choice for every kind; a kind they never touched is on. */
export async function readNotificationSettings(userId: string): Promise<NotificationSettings> {
  const rows = await db()
    .select({ kind: notificationPreferences.kind, enabled: notificationPreferences.enabled })
    .from(notificationPreferences)
    .where(eq(notificationPreferences.userId, userId));
  const settings = Object.fromEntries(NOTIFICATION_KINDS.map((kind) => [kind, true]));
  for (const row of rows) settings[row.kind] = row.enabled;
  return settings as NotificationSettings;
}

export async function saveNotificationSetting(
  userId: string,
  kind: NotificationKind,
  enabled: boolean,
): Promise<void> {
  await db()
    .insert(notificationPreferences)
    .values({ userId, kind, enabled })
    .onConflictDoUpdate({
      target: [notificationPreferences.userId, notificationPreferences.kind],
      set: { enabled, updatedAt: new Date() },
    });
}

/** Whether this user wants e-mail of this kind (on unless they turned it off). */
export async function wantsEmail(userId: string, kind: NotificationKind): Promise<boolean> {
  const [row] = await db()
    .select({ enabled: notificationPreferences.enabled })
    .from(notificationPreferences)
    .where(and(eq(notificationPreferences.userId, userId), eq(notificationPreferences.kind, kind)));
  return row?.enabled ?? true;
}
