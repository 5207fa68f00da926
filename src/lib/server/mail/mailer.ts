import nodemailer, { type Transporter } from 'nodemailer';
import { config } from '../config';

/** One message in both forms; every template supplies both. */
export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
}

let transporter: Transporter | undefined;
let from = '';

function transport(): Transporter {
  if (!transporter) {
    // SMTP: maildev on loopback in development and tests, a real relay in production.
    const mail = config().mail;
    from = mail.from;
    transporter = nodemailer.createTransport({
      host: mail.host,
      port: mail.port,
      secure: mail.secure,
      ...(mail.user ? { auth: { user: mail.user, pass: mail.password } } : {}),
    });
  }
  return transporter;
}

/** Sends one e-mail over SMTP; throws when the server refuses it, so callers can tell the person. */
export async function sendMail(message: MailMessage): Promise<void> {
  const smtp = transport();
  await smtp.sendMail({ from, ...message });
}
