"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { saveNotificationSetting } from "@/db/queries/notification-preferences";
import { NOTIFICATION_KINDS } from "@/db/schema/reviews";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireUser } from "@/lib/auth/guards";
import { notificationSettingsPath } from "@/lib/notifications/links";

const settingSchema = z.object({ kind: z.enum(NOTIFICATION_KINDS), enabled: z.boolean() });

/** Turns one kind of e-mail on or off for the signed-in person (in every workspace). */
export async function updateNotificationSetting(
  workspaceId: string,
  input: { kind: string; enabled: boolean },
): Promise<ActionResult> {
  try {
    const user = await requireUser();
    const values = settingSchema.parse(input);
    await saveNotificationSetting(user.id, values.kind, values.enabled);
    revalidatePath(notificationSettingsPath(workspaceId));
    return succeed();
  } catch (error) {
    return failWith(error, "update-notification-setting");
  }
}
