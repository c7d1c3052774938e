// Outgoing e-mail: actions queue it in the outbox; the worker's sender delivers it through
// nodemailer to the SMTP server named in configuration.
export { queueMail, runMailSender, type MailSenderOptions } from "./outbox";
export { sendMail, type OutgoingMail } from "./send";
export { createMailTransport, mailTransport } from "./transport";
