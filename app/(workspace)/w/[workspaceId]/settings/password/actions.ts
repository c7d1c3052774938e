"use server";

import { findUserById, replacePassword } from "@/db/queries/users";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireUser } from "@/lib/auth/guards";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import {
  admitSignInAttempt,
  recordFailedSignIn,
  TooManyAttemptsError,
} from "@/lib/auth/rate-limit";
import { RuleError } from "@/lib/errors";
import { requestClientAddress } from "@/lib/http/request-client";
import { passwordChangeSchema, type PasswordChangeInput } from "@/lib/validation/auth";

/**
 * Sets a new password for the signed-in person after checking the current one (guessed current
 * passwords count like wrong sign-ins). Every session ends, this one too, so the person signs in
 * again with the new password.
 */
export async function changePassword(input: PasswordChangeInput): Promise<ActionResult> {
  try {
    const signedIn = await requireUser();
    const values = passwordChangeSchema.parse(input);
    const user = await findUserById(signedIn.id);
    if (!user) throw new RuleError(404, "Your account no longer exists.");
    if (user.passwordHash) {
      const client = await requestClientAddress();
      await admitSignInAttempt(user.email, client).catch((error: unknown) => {
        if (error instanceof TooManyAttemptsError) throw new RuleError(429, error.message);
        throw error;
      });
      if (!(await verifyPassword(values.currentPassword, user.passwordHash))) {
        await recordFailedSignIn(user.email, client);
        throw new RuleError(422, "That is not your current password.", "currentPassword");
      }
    }
    await replacePassword(user.id, await hashPassword(values.newPassword));
    return succeed();
  } catch (error) {
    return failWith(error, "change-password");
  }
}
