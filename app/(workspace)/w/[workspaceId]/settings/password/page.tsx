import type { Metadata } from "next";
import { PasswordForm } from "@/components/auth/password-form";
import { findUserById } from "@/db/queries/users";
import { guardPage } from "@/lib/auth/page-guard";
import { changePassword } from "./actions";

export const metadata: Metadata = { title: "Password" };

export default async function PasswordSettingsPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  const here = `/w/${workspaceId}/settings/password`;
  const { user } = await guardPage(workspaceId, "readWorkspace", here);
  const hasPassword = Boolean((await findUserById(user.id))?.passwordHash);
  return (
    <div className="max-w-md space-y-6">
      <div>
        <h1 className="text-3xl font-semibold tracking-tight">
          {hasPassword ? "Change your password" : "Set a password"}
        </h1>
        <p className="mt-1 text-sm text-ink-soft">
          For {user.email}. Afterwards every session of yours ends, on this device and any other,
          and you sign in again with the new password.
        </p>
      </div>
      <PasswordForm
        hasPassword={hasPassword}
        changePassword={changePassword}
        signInAgain={`/sign-in?passwordChanged=1&callbackUrl=${encodeURIComponent(here)}`}
      />
    </div>
  );
}
