// Paying by invoice against a purchase order: a trust admin asks, the request is stored and audited in one
// transaction, and e-mailed to the trust's billing contact and to ops, who arrange it with the payment provider.
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit } from '../audit/audit.repository';
import { config } from '../config';
import { sendMail } from '../mail/mailer';
import { invoicePaymentRequestMail } from '../mail/templates';
import type { InvoicePaymentInput } from './billing.schemas';
import type { BillingRequest } from './billing.service';

/** The trust's newest request to pay by invoice, as the billing page and API show it. */
export interface InvoicePaymentRequestView {
  id: string;
  purchaseOrder: string;
  billingEmail: string;
  note: string | null;
  status: 'requested' | 'arranged' | 'declined';
  statusLabel: string;
  requestedByEmail: string;
  requestedAt: string;
}

const STATUS_LABELS: Record<InvoicePaymentRequestView['status'], string> = {
  requested: 'Invoice payment requested',
  arranged: 'Paying by invoice',
  declined: 'Invoice payment declined',
};

/** The newest request of the trust, or null. */
export async function latestInvoicePaymentRequest(
  db: Kysely<Database>,
  trustId: string,
): Promise<InvoicePaymentRequestView | null> {
  const row = await db
    .selectFrom('invoice_payment_requests')
    .selectAll()
    .where('trust_id', '=', trustId)
    .orderBy('created_at', 'desc')
    .limit(1)
    .executeTakeFirst();
  if (!row) return null;
  const status = row.status as InvoicePaymentRequestView['status'];
  return {
    id: row.id,
    purchaseOrder: row.purchase_order,
    billingEmail: row.billing_email,
    note: row.note,
    status,
    statusLabel: STATUS_LABELS[status] ?? row.status,
    requestedByEmail: row.requested_by_email,
    requestedAt: row.created_at.toISOString(),
  };
}

/**
 * Stores the request with its audit event in one transaction, then e-mails it to the billing contact and ops.
 * If the e-mail cannot be sent, nothing is kept (the transaction is rolled back) and the error says so.
 */
export async function requestInvoicePayment(
  db: Kysely<Database>,
  req: BillingRequest,
  input: InvoicePaymentInput,
): Promise<InvoicePaymentRequestView> {
  await db.transaction().execute(async (trx) => {
    const row = await trx
      .insertInto('invoice_payment_requests')
      .values({
        trust_id: req.trust.id,
        purchase_order: input.purchaseOrder,
        billing_email: input.billingEmail,
        note: input.note || null,
        requested_by_user_id: req.actor.actorUserId ?? null,
        requested_by_email: req.actor.actorEmail,
      })
      .returning(['id', 'created_at'])
      .executeTakeFirstOrThrow();
    await recordAudit(trx, {
      trustId: req.trust.id,
      ...req.actor,
      action: 'billing.invoice_payment_requested',
      entityType: 'invoice_payment_request',
      entityId: row.id,
      summary: `${req.actor.actorEmail} asked to pay by invoice, purchase order ${input.purchaseOrder}, invoices to ${input.billingEmail}`,
      after: { purchaseOrder: input.purchaseOrder, billingEmail: input.billingEmail, note: input.note ?? null },
    });
    await sendMail(
      invoicePaymentRequestMail([input.billingEmail, config().billing.opsEmail], {
        trustName: req.trust.name,
        trustId: req.trust.id,
        purchaseOrder: input.purchaseOrder,
        billingEmail: input.billingEmail,
        requestedBy: req.actor.actorEmail,
        note: input.note ?? null,
        billingUrl: `${req.origin}/app/settings/billing`,
      }),
    );
  });
  const latest = await latestInvoicePaymentRequest(db, req.trust.id);
  if (!latest) throw new Error('The invoice payment request was not stored');
  return latest;
}
