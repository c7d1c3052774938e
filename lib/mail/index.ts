// Outgoing e-mail through nodemailer; the SMTP server comes from configuration only.
export { sendMail, type OutgoingMail } from "./send";
export { createMailTransport, mailTransport } from "./transport";
