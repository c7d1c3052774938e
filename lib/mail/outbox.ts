import {
  claimDueMail,
  insertOutgoingMail,
  markMailFailed,
  markMailSent,
} from "@/db/queries/mail-outbox";
import { env } from "@/lib/env";
import { pause } from "@/lib/pause";
import { sendMail, type OutgoingMail } from "./send";

/**
 * Puts a message in the outbox (PostgreSQL) and returns at once; the worker's mail sender delivers
 * it. An action that e-mails therefore never waits for the SMTP relay, and a message written while
 * the relay is down goes out when it is back.
 */
export async function queueMail(mail: OutgoingMail): Promise<{ outboxId: string }> {
  const recipients = Array.isArray(mail.to) ? mail.to.join(", ") : mail.to;
  const outboxId = await insertOutgoingMail({ ...mail, recipients });
  return { outboxId };
}

export interface MailSenderOptions {
  /** How often the outbox is looked at while idle. */
  pollMs: number;
  /** Stops the loop (the worker shutting down); a send in progress finishes first. */
  signal: AbortSignal;
  log(line: string): void;
  /** The wait after a message's first failed attempt; it doubles with each further one. */
  firstRetrySeconds?: number;
}

/** Messages taken per look; a slow relay then holds up at most this many. */
const batchSize = 20;
/** Retries start 5 s apart and double, to at most 10 minutes: a relay that is down is not hammered. */
const defaultFirstRetrySeconds = 5;
const longestRetrySeconds = 10 * 60;

function retryDelaySeconds(firstRetrySeconds: number, failedAttempts: number): number {
  return Math.min(longestRetrySeconds, firstRetrySeconds * 2 ** Math.max(0, failedAttempts - 1));
}

/**
 * Delivers the outbox until `signal` aborts: every due message is sent over SMTP and marked sent,
 * or kept with its next attempt pushed back (5 s, 10 s, 20 s … at most 10 minutes apart). Nothing
 * is ever dropped. Failures are logged in one line, without the recipient's address.
 */
export async function runMailSender(options: MailSenderOptions): Promise<void> {
  // A claimed message is not taken again until a send could have timed out three times over.
  const leaseSeconds = Math.ceil((3 * env().MAIL_TIMEOUT_MS) / 1000) + 30;
  while (!options.signal.aborted) {
    let claimed = 0;
    try {
      const due = await claimDueMail(batchSize, leaseSeconds);
      claimed = due.length;
      for (const message of due) {
        try {
          await sendMail({
            to: message.recipients,
            subject: message.subject,
            text: message.text,
            html: message.html ?? undefined,
          });
          await markMailSent(message.id);
        } catch (error) {
          const reason = error instanceof Error ? error.message : String(error);
          const delay = retryDelaySeconds(
            options.firstRetrySeconds ?? defaultFirstRetrySeconds,
            message.attempts + 1,
          );
          await markMailFailed(message.id, reason, delay);
          options.log(`mail ${message.id} not sent (${reason}); next try in ${delay} s`);
        }
      }
    } catch (error) {
      options.log(`outbox unavailable: ${error instanceof Error ? error.message : error}`);
    }
    // A full batch may mean more is waiting: look again at once.
    if (claimed < batchSize) await pause(options.pollMs, options.signal);
  }
}
