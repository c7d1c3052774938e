import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { devMailDirectory, readMessage } from "@/lib/mail/dev-inbox";
import { formatReceivedAt } from "../format-time";

export const metadata: Metadata = { title: "Development inbox" };

const linkPattern = /(https?:\/\/[^\s<>"']+)/g;

/** The text body with its web links made clickable; everything else stays plain text. */
function TextWithLinks({ text }: { text: string }) {
  return text.split(linkPattern).map((part, index) =>
    // split() with a capturing group puts the matched links at the odd positions.
    index % 2 === 1 ? (
      <a key={index} href={part} className="break-all text-indigo underline underline-offset-2">
        {part}
      </a>
    ) : (
      part
    ),
  );
}

export default async function DevelopmentMessagePage({
  params,
}: {
  params: Promise<{ messageId: string }>;
}) {
  await connection();
  if (!devMailDirectory()) notFound();
  const { messageId } = await params;
  const message = await readMessage(messageId);
  if (!message) notFound();

  return (
    <article className="space-y-6">
      <Link href="/dev/inbox" className="text-sm text-ink-soft hover:text-ink">
        ← All caught mail
      </Link>
      <header className="space-y-3 rounded-lg border border-ink/10 bg-white/80 px-6 py-5">
        <h1 className="text-2xl font-semibold tracking-tight">{message.subject}</h1>
        <dl className="grid grid-cols-[5rem_1fr] gap-x-4 gap-y-1 text-sm">
          <dt className="text-ink-faint">From</dt>
          <dd>{message.from}</dd>
          <dt className="text-ink-faint">To</dt>
          <dd>{message.to.join(", ")}</dd>
          <dt className="text-ink-faint">Received</dt>
          <dd>
            <time dateTime={message.receivedAt.toISOString()}>
              {formatReceivedAt(message.receivedAt)}
            </time>
          </dd>
        </dl>
      </header>
      <pre className="overflow-x-auto rounded-lg border border-ink/10 bg-white/80 px-6 py-5 font-sans text-sm leading-relaxed whitespace-pre-wrap">
        <TextWithLinks text={message.text || "(this message has no text body)"} />
      </pre>
    </article>
  );
}
