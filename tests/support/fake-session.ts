import type { SessionUser } from "@/lib/auth/session";

/**
 * Stands in for lib/auth/session in tests: `vi.mock("@/lib/auth/session", () =>
 * import("@/tests/support/fake-session"))`, then `actAs(user)` picks who is signed in.
 */
let current: SessionUser | null = null;

export function actAs(user: SessionUser | null): void {
  current = user;
}

export async function getSessionUser(): Promise<SessionUser | null> {
  return current;
}
