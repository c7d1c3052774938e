import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { devMailDirectory, listMessages } from "@/lib/mail/dev-inbox";
import { formatReceivedAt } from "./format-time";

export const metadata: Metadata = { title: "Development inbox" };

export default async function DevelopmentInboxPage() {
  // Read at request time: whether the mail fake is in use is decided when the server starts.
  await connection();
  if (!devMailDirectory()) notFound();
  const messages = await listMessages();

  return (
    <section className="space-y-6">
      <div className="flex items-baseline justify-between gap-4">
        <h1 className="text-2xl font-semibold tracking-tight">Caught mail</h1>
        <p className="text-sm text-ink-soft">
          {messages.length === 1 ? "1 message" : `${messages.length} messages`}, newest first
        </p>
      </div>
      {messages.length === 0 ? (
        <p className="rounded-lg border border-dashed border-ink/20 bg-white/60 px-6 py-10 text-center text-ink-soft">
          Nothing yet. Messages Partita sends — sign-in links, invitations, review notices — appear
          here instead of being delivered.
        </p>
      ) : (
        <ul className="divide-y divide-ink/10 overflow-hidden rounded-lg border border-ink/10 bg-white/80">
          {messages.map((message) => (
            <li key={message.id}>
              <Link
                href={`/dev/inbox/${message.id}`}
                className="grid gap-1 px-5 py-3 hover:bg-paper-deep sm:grid-cols-[14rem_1fr_auto] sm:items-baseline sm:gap-4"
              >
                <span className="truncate text-sm text-ink-soft">{message.to.join(", ")}</span>
                <span className="truncate font-medium">{message.subject}</span>
                <time
                  dateTime={message.receivedAt.toISOString()}
                  className="text-xs whitespace-nowrap text-ink-faint"
                >
                  {formatReceivedAt(message.receivedAt)}
                </time>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
