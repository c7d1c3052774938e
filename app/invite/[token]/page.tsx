import type { Metadata } from "next";
import Link from "next/link";
import { Wordmark } from "@/components/brand/wordmark";
import { AcceptInvitationButton } from "@/components/auth/accept-invitation-button";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { describeInvitationState, findInvitationByToken } from "@/db/queries/invitations";
import { getSessionUser } from "@/lib/auth/session";
import { ROLE_DESCRIPTIONS, ROLE_LABELS } from "@/lib/auth/roles";
import { acceptInvitationAction } from "./actions";

export const metadata: Metadata = { title: "Invitation" };

/** Public: the token in the URL is the credential; everything else needs sign-in. */
export default async function InvitationPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const [invitation, user] = await Promise.all([findInvitationByToken(token), getSessionUser()]);
  const here = `/invite/${token}`;
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 p-6">
      <Wordmark />
      {!invitation ? (
        <Notice tone="error">
          This invitation link is not valid. Check that you copied all of it.
        </Notice>
      ) : invitation.state !== "pending" ? (
        <Notice tone="error">{describeInvitationState(invitation.state)}</Notice>
      ) : (
        <>
          <header className="space-y-2">
            <h1 className="text-2xl font-semibold">Join {invitation.workspaceName}</h1>
            <p className="text-sm text-ink-soft">
              {invitation.invitedByName ?? "An owner"} invited{" "}
              <strong className="text-ink">{invitation.email}</strong> as{" "}
              {ROLE_LABELS[invitation.role].toLowerCase()}. {ROLE_DESCRIPTIONS[invitation.role]}
            </p>
          </header>
          {user ? (
            <AcceptInvitationButton
              accept={acceptInvitationAction.bind(null, token)}
              workspaceName={invitation.workspaceName}
            />
          ) : (
            <div className="flex flex-col gap-3">
              <Link
                href={`/sign-up?invitation=${encodeURIComponent(token)}`}
                className={buttonClasses("primary")}
              >
                Create an account and join
              </Link>
              <Link
                href={`/sign-in?callbackUrl=${encodeURIComponent(here)}`}
                className={buttonClasses("quiet")}
              >
                I already have an account — sign in
              </Link>
            </div>
          )}
        </>
      )}
    </main>
  );
}
