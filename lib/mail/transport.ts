import nodemailer, { type Transporter } from "nodemailer";
import { env, type Environment } from "@/lib/env";

type MailSettings = Pick<
  Environment,
  "SMTP_HOST" | "SMTP_PORT" | "SMTP_USER" | "SMTP_PASSWORD" | "SMTP_SECURE" | "MAIL_TIMEOUT_MS"
>;

/**
 * A nodemailer SMTP transport from configuration. A plain, unauthenticated server (the local fake)
 * gets `ignoreTLS`: the fake offers no usable STARTTLS. A real relay keeps nodemailer's default of
 * upgrading with STARTTLS when offered, or uses implicit TLS with SMTP_SECURE=true.
 * Connecting, the server's greeting and each later answer wait at most MAIL_TIMEOUT_MS (nodemailer
 * would otherwise wait two minutes, half a minute and ten minutes), so a frozen relay fails a send
 * quickly and the outbox tries again later.
 */
export function createMailTransport(settings: MailSettings): Transporter {
  const authenticated = Boolean(settings.SMTP_USER);
  return nodemailer.createTransport({
    host: settings.SMTP_HOST,
    port: settings.SMTP_PORT,
    secure: settings.SMTP_SECURE,
    ignoreTLS: !settings.SMTP_SECURE && !authenticated,
    connectionTimeout: settings.MAIL_TIMEOUT_MS,
    greetingTimeout: settings.MAIL_TIMEOUT_MS,
    socketTimeout: settings.MAIL_TIMEOUT_MS,
    auth: authenticated
      ? { user: settings.SMTP_USER, pass: settings.SMTP_PASSWORD ?? "" }
      : undefined,
  });
}

let cached: Transporter | undefined;

/** The transport of this process's configuration, created on first use. */
export function mailTransport(): Transporter {
  cached ??= createMailTransport(env());
  return cached;
}
