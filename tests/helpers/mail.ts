// Reading the local SMTP fake's inbox (maildev 3: GET /api/email) in tests.
import { waitFor } from './wait';

const INBOX_URL = (process.env.MAIL_INBOX_URL ?? 'http://127.0.0.1:54336').replace(/\/$/, '');

/** One received message as maildev reports it. */
export interface ReceivedMail {
  id: string;
  subject: string;
  text: string;
  html: string;
  to: { address: string; name?: string }[];
  /** When maildev received it (ISO 8601). */
  time: string;
}

/** Every message in the inbox, oldest first. */
export async function listMail(): Promise<ReceivedMail[]> {
  const response = await fetch(`${INBOX_URL}/api/email`);
  if (!response.ok) throw new Error(`The mail inbox answered ${response.status}`);
  return (await response.json()) as ReceivedMail[];
}

/** Waits for the newest message to `to` whose subject contains `subjectIncludes` (case-insensitive); throws after `timeoutMs`. */
export function waitForMail(to: string, subjectIncludes = '', timeoutMs = 10_000): Promise<ReceivedMail> {
  const wanted = to.toLowerCase();
  return waitFor(
    `an e-mail to ${to} about "${subjectIncludes}" arrives`,
    async () =>
      (await listMail())
        .filter((m) => m.to.some((r) => r.address.toLowerCase() === wanted))
        .filter((m) => m.subject.toLowerCase().includes(subjectIncludes.toLowerCase()))
        .at(-1),
    { timeoutMs, intervalMs: 200 },
  );
}

/** The first link in a message's plain text whose path starts with `pathPrefix` (e.g. '/reset-password'). */
export function linkIn(mail: ReceivedMail, pathPrefix: string): URL {
  for (const match of mail.text.matchAll(/https?:\/\/[^\s<>"]+/g)) {
    const url = new URL(match[0]);
    if (url.pathname.startsWith(pathPrefix)) return url;
  }
  throw new Error(`No ${pathPrefix} link in the e-mail "${mail.subject}"`);
}
