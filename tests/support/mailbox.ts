import { findMessagesTo, type InboxMessage } from "@/lib/mail/dev-inbox";

/**
 * Waits until a message to `address` whose subject matches arrives at the SMTP fake, and returns
 * it. Mail queued by the app leaves through the outbox, which the worker empties about once a
 * second, and the fake writes each message to disk after accepting it; this polls for up to 30 s
 * (a bounded wait for an event on a loaded machine, not a timing assertion).
 */
export async function waitForMessage(address: string, subject: RegExp): Promise<InboxMessage> {
  for (let attempt = 0; attempt < 300; attempt += 1) {
    const match = (await findMessagesTo(address)).find((message) => subject.test(message.subject));
    if (match) return match;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error(`no e-mail matching ${subject} reached ${address}`);
}

/** Subjects of every message that reached `address` so far, oldest first. */
export async function subjectsTo(address: string): Promise<string[]> {
  return (await findMessagesTo(address)).map((message) => message.subject).reverse();
}
