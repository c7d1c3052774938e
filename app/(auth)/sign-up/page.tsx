import type { Metadata } from "next";
import { SignUpForm } from "@/components/auth/sign-up-form";
import { findInvitationByToken } from "@/db/queries/invitations";
import { signUp } from "./actions";

export const metadata: Metadata = { title: "Create an account" };

export default async function SignUpPage({
  searchParams,
}: {
  searchParams: Promise<{ invitation?: string }>;
}) {
  const { invitation: token } = await searchParams;
  const invitation = token ? await findInvitationByToken(token) : undefined;
  const pending = invitation?.state === "pending" ? invitation : undefined;
  return (
    <>
      <header className="space-y-1">
        <h1 className="text-2xl font-semibold">Create your Partita account</h1>
        <p className="text-sm text-ink-soft">
          {pending
            ? `You'll join ${pending.workspaceName} as soon as your account exists.`
            : "You get a workspace of your own to upload datasets and partition maps into."}
        </p>
      </header>
      <SignUpForm
        invitedEmail={pending?.email}
        invitationToken={pending ? token : undefined}
        signUp={signUp}
      />
    </>
  );
}
