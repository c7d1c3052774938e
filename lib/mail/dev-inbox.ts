import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import { simpleParser, type AddressObject, type ParsedMail } from "mailparser";
import { env } from "@/lib/env";

/**
 * Reads the messages the local SMTP fake (fakes/smtp.ts) wrote into DEV_MAIL_DIR, one .eml file
 * each, named so that names sort by arrival time. For the development inbox page and for tests.
 */

export interface InboxMessageSummary {
  /** The file name without `.eml`; safe to put in a URL. */
  id: string;
  from: string;
  to: string[];
  subject: string;
  receivedAt: Date;
}

export interface InboxMessage extends InboxMessageSummary {
  text: string;
}

const messageIdPattern = /^[0-9A-Za-z-]+$/;

/** The inbox folder when the mail fake is in use, otherwise undefined. */
export function devMailDirectory(): string | undefined {
  return env().DEV_MAIL_DIR || undefined;
}

function requireDirectory(directory: string | undefined): string {
  const resolved = directory ?? devMailDirectory();
  if (!resolved) throw new Error("DEV_MAIL_DIR is not set: the local mail fake is not in use");
  return resolved;
}

/** All messages, newest first. */
export async function listMessages(directory?: string): Promise<InboxMessageSummary[]> {
  const messages = await readAllMessages(requireDirectory(directory));
  return messages.map(({ id, from, to, subject, receivedAt }) => ({
    id,
    from,
    to,
    subject,
    receivedAt,
  }));
}

/** One message, or undefined when the id is malformed or names no message. */
export async function readMessage(
  id: string,
  directory?: string,
): Promise<InboxMessage | undefined> {
  if (!messageIdPattern.test(id)) return undefined;
  const folder = requireDirectory(directory);
  const raw = await readFile(path.join(folder, `${id}.eml`)).catch(() => undefined);
  return raw ? toInboxMessage(id, await simpleParser(raw)) : undefined;
}

/** Messages addressed (To, Cc or Bcc) to this address, newest first; case-insensitive. */
export async function findMessagesTo(address: string, directory?: string): Promise<InboxMessage[]> {
  const wanted = address.trim().toLowerCase();
  const messages = await readAllMessages(requireDirectory(directory));
  return messages.filter((message) => message.to.includes(wanted));
}

async function readAllMessages(folder: string): Promise<InboxMessage[]> {
  const names = await readdir(folder).catch((error: NodeJS.ErrnoException) => {
    if (error.code === "ENOENT") return [];
    throw error;
  });
  const ids = names
    .filter((name) => name.endsWith(".eml"))
    .map((name) => name.slice(0, -".eml".length))
    .filter((id) => messageIdPattern.test(id))
    .sort()
    .reverse();
  const messages = await Promise.all(ids.map((id) => readMessage(id, folder)));
  return messages.filter((message): message is InboxMessage => message !== undefined);
}

function toInboxMessage(id: string, parsed: ParsedMail): InboxMessage {
  return {
    id,
    from: parsed.from?.text ?? "",
    to: recipientsOf(parsed),
    subject: parsed.subject ?? "(no subject)",
    receivedAt: receivedAtOf(id, parsed),
    text: parsed.text ?? "",
  };
}

/** The SMTP envelope (added by the fake) names every recipient, Bcc included. */
function recipientsOf(parsed: ParsedMail): string[] {
  const envelope = parsed.headers.get("x-envelope-to");
  const addresses =
    typeof envelope === "string"
      ? envelope.split(",")
      : [parsed.to, parsed.cc].flatMap((field) => addressesOf(field));
  return addresses.map((address) => address.trim().toLowerCase()).filter(Boolean);
}

function addressesOf(field: AddressObject | AddressObject[] | undefined): string[] {
  const objects = field === undefined ? [] : Array.isArray(field) ? field : [field];
  return objects.flatMap((object) => object.value.map((entry) => entry.address ?? ""));
}

/** The arrival time is the first part of the file name (an ISO time with `:` and `.` as `-`). */
function receivedAtOf(id: string, parsed: ParsedMail): Date {
  const match = /^(\d{4}-\d{2}-\d{2})T(\d{2})-(\d{2})-(\d{2})-(\d{3})Z/.exec(id);
  if (!match) return parsed.date ?? new Date(0);
  const [, day, hours, minutes, seconds, millis] = match;
  return new Date(`${day}T${hours}:${minutes}:${seconds}.${millis}Z`);
}
