"use client";

import { signOut } from "next-auth/react";

export function SignOutButton() {
  return (
    <button
      type="button"
      onClick={() => signOut({ callbackUrl: "/sign-in" })}
      className="rounded px-2 py-1 text-sm text-ink-soft hover:bg-paper-deep hover:text-ink"
    >
      Sign out
    </button>
  );
}
