"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState, useTransition, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";
import { MIN_PASSWORD_LENGTH, type SignUpInput } from "@/lib/validation/auth";

type Values = { name: string; email: string; password: string; workspaceName: string };

export function SignUpForm({
  invitedEmail,
  invitationToken,
  signUp,
}: {
  invitedEmail?: string;
  invitationToken?: string;
  /** The route's action. */
  signUp: (input: SignUpInput) => Promise<ActionResult<{ email: string }>>;
}) {
  const router = useRouter();
  const [values, setValues] = useState<Values>({
    name: "",
    email: invitedEmail ?? "",
    password: "",
    workspaceName: "",
  });
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string>();
  const [pending, startTransition] = useTransition();

  const update = (field: keyof Values) => (event: { target: { value: string } }) =>
    setValues((current) => ({ ...current, [field]: event.target.value }));

  function submit(event: FormEvent) {
    event.preventDefault();
    startTransition(async () => {
      const result = await signUp({ ...values, invitationToken });
      if (!result.ok) {
        setFieldErrors(result.fieldErrors);
        setMessage(Object.keys(result.fieldErrors).length ? undefined : result.message);
        return;
      }
      router.push(`/sign-up/check-email?email=${encodeURIComponent(result.data.email)}`);
    });
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      {message ? <Notice tone="error">{message}</Notice> : null}
      <Field
        label="Your name"
        name="name"
        autoComplete="name"
        value={values.name}
        onChange={update("name")}
        error={fieldErrors.name}
        required
      />
      <Field
        label="E-mail"
        name="email"
        type="email"
        autoComplete="email"
        value={values.email}
        onChange={update("email")}
        error={fieldErrors.email}
        readOnly={Boolean(invitedEmail)}
        required
      />
      <Field
        label="Password"
        name="password"
        type="password"
        autoComplete="new-password"
        value={values.password}
        onChange={update("password")}
        error={fieldErrors.password}
        hint={`At least ${MIN_PASSWORD_LENGTH} characters.`}
        required
      />
      <Field
        label="Workspace name"
        name="workspaceName"
        value={values.workspaceName}
        onChange={update("workspaceName")}
        error={fieldErrors.workspaceName}
        hint="Your own workspace; you can invite colleagues to it later."
        placeholder="e.g. Sensor fleet team"
        required
      />
      <Button type="submit" disabled={pending} className="w-full">
        {pending ? "Creating your account…" : "Create account"}
      </Button>
      <p className="text-center text-sm text-ink-soft">
        Already have an account?{" "}
        <Link
          className="font-medium text-indigo underline-offset-2 hover:underline"
          href="/sign-in"
        >
          Sign in
        </Link>
      </p>
    </form>
  );
}
