"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";
import { MIN_PASSWORD_LENGTH, type PasswordChangeInput } from "@/lib/validation/auth";

export function PasswordForm({
  hasPassword,
  changePassword,
  signInAgain,
}: {
  hasPassword: boolean;
  changePassword: (input: PasswordChangeInput) => Promise<ActionResult>;
  signInAgain: string;
}) {
  const router = useRouter();
  const [values, setValues] = useState<PasswordChangeInput>({
    currentPassword: "",
    newPassword: "",
  });
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string>();
  const [pending, startTransition] = useTransition();

  function submit(event: FormEvent) {
    event.preventDefault();
    startTransition(async () => {
      const result = await changePassword(values);
      if (result.ok) {
        router.push(signInAgain);
        return;
      }
      setFieldErrors(result.fieldErrors);
      setMessage(Object.keys(result.fieldErrors).length ? undefined : result.message);
    });
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      {message ? <Notice tone="error">{message}</Notice> : null}
      {hasPassword ? (
        <Field
          label="Current password"
          name="currentPassword"
          type="password"
          autoComplete="current-password"
          value={values.currentPassword}
          onChange={(event) => setValues({ ...values, currentPassword: event.target.value })}
          error={fieldErrors.currentPassword}
          required
        />
      ) : null}
      <Field
        label="New password"
        name="newPassword"
        type="password"
        autoComplete="new-password"
        value={values.newPassword}
        onChange={(event) => setValues({ ...values, newPassword: event.target.value })}
        error={fieldErrors.newPassword}
        hint={`At least ${MIN_PASSWORD_LENGTH} characters.`}
        required
      />
      <Button type="submit" disabled={pending}>
        {pending ? "Saving…" : hasPassword ? "Change password" : "Set password"}
      </Button>
    </form>
  );
}
