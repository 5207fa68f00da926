import nodemailer, { type Transporter } from 'nodemailer';
import { z } from 'zod';

/** SMTP settings from the environment: maildev on loopback in development and tests, a real relay in production. */
const MailConfigSchema = z.object({
  SMTP_HOST: z.string().min(1).default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().positive().default(54325),
  SMTP_SECURE: z.enum(['true', 'false']).default('false'),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  MAIL_FROM: z.string().min(3).default('Airtally <no-reply@airtally.test>'),
});

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
    const env = MailConfigSchema.parse(process.env);
    from = env.MAIL_FROM;
    transporter = nodemailer.createTransport({
      host: env.SMTP_HOST,
      port: env.SMTP_PORT,
      secure: env.SMTP_SECURE === 'true',
      ...(env.SMTP_USER ? { auth: { user: env.SMTP_USER, pass: env.SMTP_PASSWORD ?? '' } } : {}),
    });
  }
  return transporter;
}

/** Sends one e-mail over SMTP; throws when the server refuses it, so callers can tell the person. */
export async function sendMail(message: MailMessage): Promise<void> {
  const smtp = transport();
  await smtp.sendMail({ from, ...message });
}
