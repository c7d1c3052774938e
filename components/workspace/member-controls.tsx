"use client";

import { useState, useTransition } from "react";
import type { ActionResult } from "@/lib/actions/result";
import { ROLE_LABELS, ROLES, type Role } from "@/lib/auth/roles";

/** An owner's controls on one member row: change the role, or remove them. */
export function MemberControls({
  userId,
  role,
  label,
  changeMemberRole,
  removeMember,
}: {
  userId: string;
  role: Role;
  label: string;
  /** The route's actions, bound to the workspace (and removal to this member). */
  changeMemberRole: (input: { userId: string; role: string }) => Promise<ActionResult>;
  removeMember: () => Promise<ActionResult>;
}) {
  const [error, setError] = useState<string>();
  const [pending, startTransition] = useTransition();

  function run(action: () => Promise<{ ok: boolean; message?: string }>) {
    setError(undefined);
    startTransition(async () => {
      const result = await action();
      if (!result.ok) setError(result.message);
    });
  }

  return (
    <div className="flex flex-wrap items-center justify-end gap-2">
      <label className="sr-only" htmlFor={`role-${userId}`}>
        Role of {label}
      </label>
      <select
        id={`role-${userId}`}
        value={role}
        disabled={pending}
        onChange={(event) => run(() => changeMemberRole({ userId, role: event.target.value }))}
        className="rounded-md border border-ink/20 bg-white px-2 py-1 text-sm"
      >
        {ROLES.map((option) => (
          <option key={option} value={option}>
            {ROLE_LABELS[option]}
          </option>
        ))}
      </select>
      <button
        type="button"
        disabled={pending}
        onClick={() => {
          if (window.confirm(`Remove ${label} from this workspace?`)) run(() => removeMember());
        }}
        className="rounded px-2 py-1 text-sm text-cadmium hover:bg-cadmium-soft"
      >
        Remove
      </button>
      {error ? (
        <p role="alert" className="basis-full text-right text-xs text-cadmium">
          {error}
        </p>
      ) : null}
    </div>
  );
}
