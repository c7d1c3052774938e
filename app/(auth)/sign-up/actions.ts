"use server";

import { findUserByEmail } from "@/db/queries/users";
import { acceptInvitation } from "@/db/queries/invitations";
import { createAccountWithWorkspace } from "@/db/queries/workspaces";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { hashPassword } from "@/lib/auth/password";
import { RuleError } from "@/lib/errors";
import { signUpSchema, type SignUpInput } from "@/lib/validation/auth";

const duplicateAccount = () =>
  new RuleError(409, "An account with this e-mail already exists. Sign in instead.", "email");

/**
 * Public by nature: creates an account and the workspace its owner starts in. When the person came
 * from an invitation, they join that workspace too and land there.
 */
export async function signUp(input: SignUpInput): Promise<ActionResult<{ landing: string }>> {
  try {
    const values = signUpSchema.parse(input);
    if (await findUserByEmail(values.email)) throw duplicateAccount();
    const { userId, workspaceId } = await createAccountWithWorkspace({
      name: values.name,
      email: values.email,
      passwordHash: await hashPassword(values.password),
      workspaceName: values.workspaceName,
    }).catch((error: unknown) => {
      // Two sign-ups for one address at the same moment: the unique index decides.
      if ((error as { code?: string }).code === "23505") throw duplicateAccount();
      throw error;
    });
    if (values.invitationToken) {
      const joined = await acceptInvitation({
        token: values.invitationToken,
        userId,
        userEmail: values.email,
      }).catch(() => undefined);
      // When joining fails the invitation page explains why (expired, other address, …).
      return succeed({
        landing: joined ? `/w/${joined.workspaceId}` : `/invite/${values.invitationToken}`,
      });
    }
    return succeed({ landing: `/w/${workspaceId}` });
  } catch (error) {
    return failWith(error, "sign-up");
  }
}
