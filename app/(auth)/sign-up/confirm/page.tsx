import type { Metadata } from "next";
import Link from "next/link";
import { ConfirmSignUpButton } from "@/components/auth/confirm-sign-up-button";
import { Notice } from "@/components/ui/notice";
import { expiredSignUpLink, findPendingSignUp } from "@/db/queries/pending-sign-ups";
import { confirmSignUp } from "./actions";

export const metadata: Metadata = { title: "Confirm your address" };

/**
 * Public: the token in the link is the credential. Confirming takes a click rather than happening
 * on opening the link, because mail scanners open links too.
 */
export default async function ConfirmSignUpPage({
  searchParams,
}: {
  searchParams: Promise<{ token?: string; invitation?: string }>;
}) {
  const { token, invitation } = await searchParams;
  const pending = token ? await findPendingSignUp(token) : undefined;
  if (!token || !pending) {
    return (
      <>
        <Notice tone="error">{expiredSignUpLink().message}</Notice>
        <Link
          href="/sign-up"
          className="text-sm font-medium text-indigo underline-offset-2 hover:underline"
        >
          Sign up again
        </Link>
      </>
    );
  }
  return (
    <>
      <header className="space-y-2">
        <h1 className="text-2xl font-semibold">Confirm your address</h1>
        <p className="text-sm text-ink-soft">
          Confirming creates the Partita account for{" "}
          <strong className="text-ink">{pending.email}</strong> with the password chosen at sign-up.
          If you did not sign up, close this page: nothing happens without the click.
        </p>
      </header>
      <ConfirmSignUpButton confirm={confirmSignUp.bind(null, token, invitation)} />
    </>
  );
}
