"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { signIn } from "next-auth/react";
import { useState, useTransition, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";

type Mode = "password" | "link";

// One message for unknown address and wrong password alike: the form never reveals who has an account.
const WRONG_CREDENTIALS = "That e-mail and password don't match an account.";

export function SignInForm({
  callbackUrl,
  initialError,
  initialEmail,
}: {
  callbackUrl: string;
  initialError?: string;
  initialEmail?: string;
}) {
  const router = useRouter();
  const [mode, setMode] = useState<Mode>("password");
  const [email, setEmail] = useState(initialEmail ?? "");
  const [password, setPassword] = useState("");
  const [error, setError] = useState(initialError);
  const [pending, startTransition] = useTransition();

  function submit(event: FormEvent) {
    event.preventDefault();
    setError(undefined);
    if (!email.trim()) {
      setError("Enter your e-mail address.");
      return;
    }
    startTransition(async () => {
      if (mode === "link") {
        const result = await signIn("email", { email, redirect: false, callbackUrl });
        if (result?.error) {
          setError(
            "We couldn't send a link just now. If you asked for several, wait a few minutes and try again.",
          );
        } else router.push(`/sign-in/check-email?email=${encodeURIComponent(email.trim())}`);
        return;
      }
      const result = await signIn("credentials", { email, password, redirect: false, callbackUrl });
      if (!result?.error) {
        router.push(callbackUrl);
        router.refresh();
        return;
      }
      setError(result.error === "CredentialsSignin" ? WRONG_CREDENTIALS : result.error);
    });
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <div
        role="tablist"
        aria-label="Sign-in method"
        className="grid grid-cols-2 rounded-md bg-paper-deep p-1 text-sm"
      >
        {(["password", "link"] as const).map((option) => (
          <button
            key={option}
            type="button"
            role="tab"
            aria-selected={mode === option}
            onClick={() => setMode(option)}
            className={`rounded px-3 py-1.5 font-medium ${mode === option ? "bg-white text-ink shadow-sm" : "text-ink-soft"}`}
          >
            {option === "password" ? "Password" : "E-mail link"}
          </button>
        ))}
      </div>
      {error ? <Notice tone="error">{error}</Notice> : null}
      <Field
        label="E-mail"
        name="email"
        type="email"
        autoComplete="email"
        value={email}
        onChange={(event) => setEmail(event.target.value)}
        required
        autoFocus
      />
      {mode === "password" ? (
        <Field
          label="Password"
          name="password"
          type="password"
          autoComplete="current-password"
          value={password}
          onChange={(event) => setPassword(event.target.value)}
          required
        />
      ) : (
        <p className="text-sm text-ink-soft">We will e-mail you a link that signs you in once.</p>
      )}
      <Button type="submit" disabled={pending} className="w-full">
        {pending ? "Working…" : mode === "password" ? "Sign in" : "Send me a link"}
      </Button>
      <p className="text-center text-sm text-ink-soft">
        New to Partita?{" "}
        <Link
          className="font-medium text-indigo underline-offset-2 hover:underline"
          href="/sign-up"
        >
          Create an account
        </Link>
      </p>
    </form>
  );
}
