import type { ColumnType, Generated } from 'kysely';
import type { Json } from './json';

type CreatedAt = ColumnType<Date, never, never>;
type UpdatedAt = ColumnType<Date, never, Date | undefined>;

/** One row per trust that has ever touched billing; a trust without a row is on the free plan. */
export interface BillingAccountsTable {
  trust_id: string;
  plan: Generated<string>;
  billing_interval: string | null;
  /** The provider's subscription status, or 'none' on the free plan. */
  status: Generated<string>;
  provider_customer_id: string | null;
  provider_subscription_id: string | null;
  /** Schools paid for (the subscription quantity). */
  quantity: Generated<number>;
  current_period_end: Date | null;
  trial_end: Date | null;
  cancel_at_period_end: Generated<boolean>;
  /** When the first unpaid renewal failed; the grace period counts from here. Null when paid up. */
  payment_failed_at: Date | null;
  /** The checkout page last started and perhaps still open at the provider; closed when checkout starts again. */
  open_checkout_session_id: string | null;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

/** Each provider event, stored once by its id. */
export interface PaymentEventsTable {
  id: string;
  type: string;
  trust_id: string | null;
  object_id: string | null;
  provider_created_at: Date;
  received_at: ColumnType<Date, never, never>;
  payload: Json<unknown>;
}

/** A trust admin's request to pay by invoice against a purchase order (the newest is the trust's standing). */
export interface InvoicePaymentRequestsTable {
  id: Generated<string>;
  trust_id: string;
  purchase_order: string;
  billing_email: string;
  note: string | null;
  /** 'requested', then 'arranged' or 'declined' by ops. */
  status: Generated<string>;
  requested_by_user_id: string | null;
  requested_by_email: string;
  created_at: CreatedAt;
}

/** Tables of the subscriptions and payment events feature. */
export interface BillingTables {
  billing_accounts: BillingAccountsTable;
  payment_events: PaymentEventsTable;
  invoice_payment_requests: InvoicePaymentRequestsTable;
}
