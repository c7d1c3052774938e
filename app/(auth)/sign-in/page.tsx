import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { SignInForm } from "@/components/auth/sign-in-form";
import { Notice } from "@/components/ui/notice";
import { sameOriginPath } from "@/lib/auth/redirects";
import { getSessionUser } from "@/lib/auth/session";
import { env } from "@/lib/env";

export const metadata: Metadata = { title: "Sign in" };

// next-auth reports problems with these codes in the `error` query parameter.
const ERROR_MESSAGES: Record<string, string> = {
  Verification: "That sign-in link has expired or was already used. Ask for a new one.",
  EmailSignin: "We couldn't send the sign-in e-mail. Please try again.",
  SessionRequired: "Please sign in to continue.",
};

export default async function SignInPage({
  searchParams,
}: {
  searchParams: Promise<{
    callbackUrl?: string;
    error?: string;
    confirmed?: string;
    passwordChanged?: string;
  }>;
}) {
  const { callbackUrl, error, confirmed, passwordChanged } = await searchParams;
  // Only same-origin paths are followed after sign-in, so the form can't be used as an open redirect.
  const target = sameOriginPath(callbackUrl, env().NEXTAUTH_URL);
  if (await getSessionUser()) redirect(target);
  return (
    <>
      <header className="space-y-1">
        <h1 className="text-2xl font-semibold">Sign in</h1>
        <p className="text-sm text-ink-soft">Welcome back. Your reports are where you left them.</p>
      </header>
      {confirmed ? (
        <Notice tone="success">
          Your address is confirmed and your account is ready. Sign in with the password you chose.
        </Notice>
      ) : null}
      {passwordChanged ? (
        <Notice tone="success">
          Your password is changed and every session has ended. Sign in with the new password.
        </Notice>
      ) : null}
      <SignInForm
        callbackUrl={target}
        initialEmail={confirmed}
        initialError={
          error ? (ERROR_MESSAGES[error] ?? "Sign-in failed. Please try again.") : undefined
        }
      />
    </>
  );
}
