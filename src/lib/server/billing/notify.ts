import { sql, type Kysely } from 'kysely';
import type Stripe from 'stripe';
import type { Database } from '../../../../db/database';
import { config } from '../config';
import { sendMail } from '../mail/mailer';
import { billingStanding } from './standing';
import { getBillingAccount } from './billing.repository';

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/** E-mail addresses of the trust's current trust admins. */
export async function trustAdminEmails(db: Kysely<Database>, trustId: string): Promise<string[]> {
  const result = await sql<{ email: string }>`
    SELECT u.email FROM "member" m JOIN "user" u ON u.id = m."userId"
    LEFT JOIN membership_limits l ON l.member_id = m.id
    WHERE m."organizationId" = ${trustId}
      AND 'trust_admin' = ANY(string_to_array(m.role, ','))
      AND (l.access_ends_on IS NULL OR l.access_ends_on > current_date)
    ORDER BY u.email`.execute(db);
  return result.rows.map((r) => r.email);
}

/** Tells every trust admin that a subscription payment failed, what happens next and what to do. */
export async function notifyPaymentFailed(
  db: Kysely<Database>,
  trustId: string,
  invoice: Stripe.Invoice,
): Promise<number> {
  const trust = await db.selectFrom('trusts').select('name').where('id', '=', trustId).executeTakeFirstOrThrow();
  const standing = billingStanding(await getBillingAccount(db, trustId));
  const amount = `£${(invoice.amount_due / 100).toFixed(2)}`;
  const until = standing.graceEndsAt ? standing.graceEndsAt.toISOString().slice(0, 10) : null;
  const link = `${config().origin}/app/settings/billing`;
  const next =
    standing.mode === 'read_only'
      ? 'Airtally is now read-only for your trust: everyone can still read and export, but changes are paused until the payment goes through.'
      : `Everything keeps working until ${until}; after that Airtally becomes read-only for your trust (reads and exports still work) until the payment goes through.`;
  const text = [
    `The payment of ${amount} for ${trust.name}'s Airtally subscription (invoice ${invoice.number ?? invoice.id}) did not go through.`,
    '',
    next,
    'Nothing is deleted.',
    '',
    `Please check the card on file or pay the invoice: ${link}`,
  ].join('\n');
  const html = `<p>The payment of <strong>${amount}</strong> for ${escapeHtml(trust.name)}'s Airtally subscription (invoice ${escapeHtml(invoice.number ?? invoice.id)}) did not go through.</p>
<p>${escapeHtml(next)} Nothing is deleted.</p><p><a href="${escapeHtml(link)}">Check the card on file or pay the invoice</a></p>`;
  const recipients = await trustAdminEmails(db, trustId);
  for (const to of recipients)
    await sendMail({ to, subject: `Airtally: payment failed for ${trust.name}`, text, html });
  return recipients.length;
}
