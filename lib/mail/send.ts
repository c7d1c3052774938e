import { env } from "@/lib/env";
import { mailTransport } from "./transport";

export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

/** Sends one message from MAIL_FROM; resolves with the Message-ID the transport assigned. */
export async function sendMail(mail: OutgoingMail): Promise<{ messageId: string }> {
  const info = await mailTransport().sendMail({
    from: env().MAIL_FROM,
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
  });
  return { messageId: info.messageId };
}
