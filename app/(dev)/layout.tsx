import Link from "next/link";
import type { ReactNode } from "react";
import { Wordmark } from "@/components/brand/wordmark";

export default function DevelopmentLayout({ children }: { children: ReactNode }) {
  return (
    <div className="min-h-screen">
      <div
        role="note"
        className="border-b border-cadmium/40 bg-cadmium-soft px-6 py-2 text-center text-sm text-ink"
      >
        <strong className="font-semibold">Development inbox</strong> — only present while the local
        mail fake is in use.
      </div>
      <header className="border-b border-ink/10 bg-white/70">
        <div className="mx-auto flex max-w-5xl items-center gap-4 px-6 py-3">
          <Link href="/" aria-label="Partita — home">
            <Wordmark />
          </Link>
          <Link href="/dev/inbox" className="rounded px-2 py-1 text-sm hover:bg-paper-deep">
            Inbox
          </Link>
        </div>
      </header>
      <main className="mx-auto max-w-5xl px-6 py-10">{children}</main>
    </div>
  );
}
