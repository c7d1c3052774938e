"use server";

import { createPendingSignUp } from "@/db/queries/pending-sign-ups";
import { findUserByEmail } from "@/db/queries/users";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { confirmAddressMessage } from "@/lib/auth/emails";
import { hashPassword } from "@/lib/auth/password";
import { admitSignUp, TooManyAttemptsError } from "@/lib/auth/rate-limit";
import { env } from "@/lib/env";
import { RuleError } from "@/lib/errors";
import { requestClientAddress } from "@/lib/http/request-client";
import { queueMail } from "@/lib/mail";
import { signUpSchema, type SignUpInput } from "@/lib/validation/auth";

/**
 * Public by nature: records the sign-up and e-mails a link that proves the address. The account,
 * its password and its workspace exist only once the link is followed (confirm/actions.ts), so
 * nobody can set up an account on an address that is not theirs.
 */
export async function signUp(input: SignUpInput): Promise<ActionResult<{ email: string }>> {
  try {
    const values = signUpSchema.parse(input);
    await admitSignUp(values.email, await requestClientAddress()).catch((error: unknown) => {
      if (error instanceof TooManyAttemptsError) throw new RuleError(429, error.message);
      throw error;
    });
    if ((await findUserByEmail(values.email))?.emailVerified) {
      throw new RuleError(
        409,
        "An account with this e-mail already exists. Sign in instead.",
        "email",
      );
    }
    const { token } = await createPendingSignUp({
      email: values.email,
      name: values.name,
      passwordHash: await hashPassword(values.password),
      workspaceName: values.workspaceName,
    });
    const link = new URL("/sign-up/confirm", env().NEXTAUTH_URL);
    link.searchParams.set("token", token);
    // The invitation travels with the link so the new account joins its workspace on confirming.
    if (values.invitationToken) link.searchParams.set("invitation", values.invitationToken);
    // Through the outbox like all mail: sign-up never waits for SMTP, nor fails while it is down.
    await queueMail({ to: values.email, ...confirmAddressMessage(link.toString()) });
    return succeed({ email: values.email });
  } catch (error) {
    return failWith(error, "sign-up");
  }
}
