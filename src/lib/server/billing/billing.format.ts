import type { BillingOverview } from './billing.schemas';

const date = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' });
const pounds = new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'GBP' });

/** 12 March 2027, or a dash. */
export const formatDate = (iso: string | null) => (iso ? date.format(new Date(iso)) : '—');

/** £24.00 from pence. */
export const formatPence = (pence: number) => pounds.format(pence / 100);

/** One line on where the subscription stands, for people (billing page and banner). */
export function standingLabel(b: BillingOverview): string {
  if (b.plan === 'free')
    return b.status === 'canceled' ? 'Free plan (the paid subscription has ended; nothing was deleted)' : 'Free plan';
  if (b.mode === 'read_only') return 'Read-only: the subscription payment has not gone through';
  if (b.mode === 'grace') return `Payment overdue: full use until ${formatDate(b.graceEndsAt)}`;
  if (b.cancelAtPeriodEnd) return `Cancels on ${formatDate(b.currentPeriodEnd)}`;
  if (b.status === 'trialing') return `Free trial until ${formatDate(b.trialEnd)}`;
  return `Active, renews on ${formatDate(b.currentPeriodEnd)}`;
}
