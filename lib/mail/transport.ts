import nodemailer, { type Transporter } from "nodemailer";
import { env, type Environment } from "@/lib/env";

type MailSettings = Pick<
  Environment,
  "SMTP_HOST" | "SMTP_PORT" | "SMTP_USER" | "SMTP_PASSWORD" | "SMTP_SECURE"
>;

/**
 * A nodemailer SMTP transport from configuration. A plain, unauthenticated server (the local fake)
 * gets `ignoreTLS`: the fake offers no usable STARTTLS. A real relay keeps nodemailer's default of
 * upgrading with STARTTLS when offered, or uses implicit TLS with SMTP_SECURE=true.
 */
export function createMailTransport(settings: MailSettings): Transporter {
  const authenticated = Boolean(settings.SMTP_USER);
  return nodemailer.createTransport({
    host: settings.SMTP_HOST,
    port: settings.SMTP_PORT,
    secure: settings.SMTP_SECURE,
    ignoreTLS: !settings.SMTP_SECURE && !authenticated,
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
