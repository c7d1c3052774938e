"use client";

import { useState, useTransition } from "react";
import { Notice } from "@/components/ui/notice";
import type { NotificationKind } from "@/db/schema/reviews";
import type { ActionResult } from "@/lib/actions/result";

const KINDS: { kind: NotificationKind; label: string; hint: string }[] = [
  {
    kind: "referred",
    label: "Referrals",
    hint: "Someone refers a report version to you for review.",
  },
  {
    kind: "decision-made",
    label: "Decisions",
    hint: "A reviewer endorses or returns a report version you referred.",
  },
  { kind: "mentioned", label: "Mentions", hint: "Someone mentions you in a comment." },
  {
    kind: "analysis-finished",
    label: "Long analyses",
    hint: "An analysis you started that ran over a minute finishes or fails.",
  },
];

/** One switch per kind of e-mail; each change is saved at once. */
export function NotificationToggles({
  initial,
  updateNotificationSetting,
}: {
  /** The route's action, bound to the workspace. */
  updateNotificationSetting: (input: { kind: string; enabled: boolean }) => Promise<ActionResult>;
  initial: Record<NotificationKind, boolean>;
}) {
  const [settings, setSettings] = useState(initial);
  const [error, setError] = useState<string>();
  const [pending, startTransition] = useTransition();

  function toggle(kind: NotificationKind, enabled: boolean) {
    setSettings((current) => ({ ...current, [kind]: enabled }));
    startTransition(async () => {
      const result = await updateNotificationSetting({ kind, enabled });
      if (result.ok) {
        setError(undefined);
        return;
      }
      setSettings((current) => ({ ...current, [kind]: !enabled }));
      setError(result.message);
    });
  }

  return (
    <div className="space-y-3">
      {error ? <Notice tone="error">{error}</Notice> : null}
      <ul className="divide-y divide-ink/5 rounded-lg border border-ink/10 bg-white">
        {KINDS.map(({ kind, label, hint }) => (
          <li key={kind} className="flex items-start gap-3 p-4">
            <input
              id={`notify-${kind}`}
              type="checkbox"
              role="switch"
              checked={settings[kind]}
              disabled={pending}
              onChange={(event) => toggle(kind, event.target.checked)}
              className="mt-1 h-4 w-4 accent-ink"
            />
            <label htmlFor={`notify-${kind}`} className="text-sm">
              <span className="block font-medium">{label}</span>
              <span className="block text-ink-soft">{hint}</span>
            </label>
          </li>
        ))}
      </ul>
    </div>
  );
}
