"use client";

import { useState, useTransition, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { ROLE_DESCRIPTIONS, ROLE_LABELS, ROLES, type Role } from "@/lib/auth/roles";
import type { ActionResult } from "@/lib/actions/result";

export function InviteForm({
  inviteMember,
}: {
  /** The route's action, bound to the workspace. */
  inviteMember: (input: {
    email: string;
    role: string;
  }) => Promise<ActionResult<{ email: string }>>;
}) {
  const [email, setEmail] = useState("");
  const [role, setRole] = useState<Role>("analyst");
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [notice, setNotice] = useState<{ tone: "error" | "success"; text: string }>();
  const [pending, startTransition] = useTransition();

  function submit(event: FormEvent) {
    event.preventDefault();
    startTransition(async () => {
      const result = await inviteMember({ email, role });
      if (result.ok) {
        setNotice({ tone: "success", text: `Invitation sent to ${result.data.email}.` });
        setFieldErrors({});
        setEmail("");
        return;
      }
      setFieldErrors(result.fieldErrors);
      setNotice(
        Object.keys(result.fieldErrors).length
          ? undefined
          : { tone: "error", text: result.message },
      );
    });
  }

  return (
    <form
      onSubmit={submit}
      noValidate
      className="space-y-4 rounded-lg border border-ink/10 bg-white p-5"
    >
      <h2 className="font-semibold">Invite someone</h2>
      {notice ? <Notice tone={notice.tone}>{notice.text}</Notice> : null}
      <Field
        label="E-mail"
        name="invite-email"
        type="email"
        value={email}
        onChange={(event) => setEmail(event.target.value)}
        error={fieldErrors.email}
        placeholder="colleague@example.com"
        required
      />
      <fieldset className="space-y-2">
        <legend className="text-sm font-medium">Role</legend>
        {ROLES.map((option) => (
          <label
            key={option}
            className="flex cursor-pointer gap-3 rounded-md border border-ink/10 p-3 has-checked:border-indigo has-checked:bg-indigo-soft/40"
          >
            <input
              type="radio"
              name="invite-role"
              value={option}
              checked={role === option}
              onChange={() => setRole(option)}
              className="mt-1 accent-indigo"
            />
            <span>
              <span className="block text-sm font-medium">{ROLE_LABELS[option]}</span>
              <span className="block text-xs text-ink-soft">{ROLE_DESCRIPTIONS[option]}</span>
            </span>
          </label>
        ))}
        {fieldErrors.role ? <p className="text-xs text-cadmium">{fieldErrors.role}</p> : null}
      </fieldset>
      <Button type="submit" disabled={pending}>
        {pending ? "Sending…" : "Send invitation"}
      </Button>
    </form>
  );
}
