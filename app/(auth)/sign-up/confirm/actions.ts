"use server";

import { acceptInvitation } from "@/db/queries/invitations";
import { confirmPendingSignUp } from "@/db/queries/pending-sign-ups";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";

/**
 * Public by nature: the token from the e-mailed link is the credential. Creates the account (or
 * resets an unproven one) and, when the sign-up came from an invitation, joins that workspace.
 * Returns where to sign in next.
 */
export async function confirmSignUp(
  token: string,
  invitationToken?: string,
): Promise<ActionResult<{ signIn: string }>> {
  try {
    const account = await confirmPendingSignUp(token);
    let landing = account.workspaceId ? `/w/${account.workspaceId}` : "/";
    if (invitationToken) {
      const joined = await acceptInvitation({
        token: invitationToken,
        userId: account.userId,
        userEmail: account.email,
      }).catch(() => undefined);
      // When joining fails the invitation page explains why (expired, other address, …).
      landing = joined ? `/w/${joined.workspaceId}` : `/invite/${invitationToken}`;
    }
    const signIn = new URLSearchParams({ confirmed: account.email, callbackUrl: landing });
    return succeed({ signIn: `/sign-in?${signIn}` });
  } catch (error) {
    return failWith(error, "confirm-sign-up");
  }
}
