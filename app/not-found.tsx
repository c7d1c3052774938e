import type { Metadata } from "next";
import Link from "next/link";
import { Wordmark } from "@/components/brand/wordmark";
import { LostPage } from "@/components/navigation/lost-page";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { getSessionUser } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Not found" };

/** Any unknown address, and workspaces the visitor does not belong to (which must not be told apart). */
export default async function NotFound() {
  const user = await getSessionUser();
  const workspaces = user ? await listWorkspacesForUser(user.id) : [];
  const links = user
    ? workspaces.map((workspace) => ({ href: `/w/${workspace.id}`, label: workspace.name }))
    : [
        { href: "/sign-in", label: "Sign in" },
        { href: "/", label: "About Partita" },
      ];
  return (
    <div className="min-h-screen">
      <header className="border-b border-ink/10 bg-white/70">
        <div className="mx-auto flex max-w-6xl items-center px-4 py-3 sm:px-6">
          <Link href="/" aria-label="Partita — home">
            <Wordmark />
          </Link>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-10 sm:px-6">
        <LostPage
          links={links.length > 0 ? links : [{ href: "/", label: "Home" }]}
          reasons={[
            "The link may be mistyped or cut short.",
            "A report or workspace may have been deleted, or you may not be a member of it.",
            ...(user ? [] : ["You may need to sign in first."]),
          ]}
        />
      </main>
    </div>
  );
}
