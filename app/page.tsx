import Link from "next/link";
import { redirect } from "next/navigation";
import { Mark, Wordmark } from "@/components/brand/wordmark";
import { buttonClasses } from "@/components/ui/button";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { getSessionUser } from "@/lib/auth/session";

export default async function HomePage() {
  const user = await getSessionUser();
  if (user) {
    const [first] = await listWorkspacesForUser(user.id);
    if (first) redirect(`/w/${first.id}`);
  }
  return (
    <main className="mx-auto flex min-h-screen max-w-5xl flex-col px-6 py-10">
      <header className="flex items-center justify-between">
        <Wordmark />
        <Link href="/sign-in" className={buttonClasses("quiet")}>
          Sign in
        </Link>
      </header>
      <section className="grid flex-1 items-center gap-12 py-16 md:grid-cols-[1.3fr_1fr]">
        <div className="space-y-6">
          <h1 className="text-4xl leading-tight font-semibold tracking-tight">
            Local steps or large minibatches? Ask your shards first.
          </h1>
          <p className="max-w-prose text-lg text-ink-soft">
            Upload a labelled dataset and its partition map. Partita measures label, size and
            feature skew and how far the shards&apos; gradients disagree, estimates noise and
            curvature, and advises — from published bounds, for your own training plan — whether
            local updates or large synchronized minibatches suit the split. Every report is
            versioned and reviewable.
          </p>
          <div className="flex gap-3">
            <Link href="/sign-up" className={buttonClasses("primary")}>
              Create an account
            </Link>
            <Link href="/sign-in" className={buttonClasses("quiet")}>
              Sign in
            </Link>
          </div>
        </div>
        <Mark className="mx-auto h-48 w-48 opacity-90" />
      </section>
      <footer className="text-xs text-ink-soft">
        The verdict rests on a convex proxy model and on rates that hide constants; deep networks
        may behave differently. A guide for planning, not a guarantee.
      </footer>
    </main>
  );
}
