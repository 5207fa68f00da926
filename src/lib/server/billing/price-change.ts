// What a change to the subscription will cost, before anything changes: the billing period (monthly ⇄ yearly) and
// the number of schools paid for. The figures come from the payment provider's invoice preview (proration included);
// nothing is stored and nothing changes at the provider.
import type { Kysely } from 'kysely';
import type Stripe from 'stripe';
import type { Database } from '../../../../db/database';
import { conflict } from '../http/errors';
import { countEstate, getBillingAccount } from './billing.repository';
import { paymentProvider, providerConfigured } from './provider';
import { formatDate, formatPence } from './billing.format';
import { planPrices } from './catalogue';
import { FREE_PLAN, PER_SCHOOL_PLAN, type BillingInterval } from './plans';
import { billingStanding } from './standing';

/** Statuses of a subscription that can still be changed. */
export const CHANGEABLE = new Set(['trialing', 'active', 'past_due', 'unpaid']);

/** The number of schools the subscription should be for (at least one). */
export const billableSchools = (schoolCount: number) => Math.max(1, schoolCount);

const perPeriod = (interval: BillingInterval) => (interval === 'year' ? 'a year' : 'a month');
const schoolsWord = (n: number) => `${n} school${n === 1 ? '' : 's'}`;

/** A proposed change of billing period, priced by the provider. Amounts in pence, VAT included. */
export interface PeriodChangePreview {
  from: BillingInterval;
  to: BillingInterval;
  schools: number;
  /** The moment the proration is computed for (Unix seconds); confirming sends it back so the charge matches. */
  prorationDate: number;
  /** Credit for the unused part of the current period (a positive number). */
  creditPence: number;
  /** The new period in full. */
  newPeriodPence: number;
  /** What is charged when the change is confirmed (new period − credit, never below 0); 0 during a trial. */
  dueNowPence: number;
  /** The renewal after that: amount and date (ISO). */
  renewsPence: number;
  renewsOn: string | null;
  trialing: boolean;
  /** The change in words, for the confirmation. */
  words: string;
}

/** A change in the number of schools, priced by the provider. Amounts in pence, VAT included. */
export interface QuantityChangePreview {
  /** False when the subscription stays as it is (free plan, no subscription, or the same number of schools). */
  changes: boolean;
  schoolsBefore: number;
  schoolsAfter: number;
  quantityBefore: number;
  quantityAfter: number;
  interval: BillingInterval | null;
  /** Prorated charge (positive) or credit (negative) for the rest of the current period, added to the next invoice. */
  prorationPence: number;
  /** The next invoice after the change (proration included) and its date (ISO). */
  nextInvoicePence: number;
  nextInvoiceOn: string | null;
  /** What each later period costs at the new number of schools. */
  perPeriodPence: number;
  /** The change in words, for the import preview, the school form and the billing page. */
  words: string;
}

/** The subscription and its one plan item, or a 409 saying there is nothing to change. */
async function changeableItem(db: Kysely<Database>, stripe: Stripe, trustId: string) {
  const account = await getBillingAccount(db, trustId);
  if (!account.subscriptionId || !CHANGEABLE.has(account.status)) {
    throw conflict(`This trust has no ${PER_SCHOOL_PLAN.name} subscription to change. Upgrade first.`);
  }
  const sub = await stripe.subscriptions.retrieve(account.subscriptionId);
  const item = sub.items.data[0];
  if (!item) throw conflict('The subscription has no plan item to change.');
  return { account, sub, item };
}

/**
 * The sum of the preview's proration lines for this change (those starting at its proration moment; earlier
 * prorations already pending are left out), or of its regular lines.
 */
const sumLines = (invoice: Stripe.Invoice, proration: boolean, at?: number) =>
  invoice.lines.data
    .filter((l) => Boolean(l.parent?.subscription_item_details?.proration) === proration)
    .filter((l) => !proration || at === undefined || l.period.start === at)
    .reduce((sum, l) => sum + l.amount, 0);

/** Prices a switch of billing period with the provider's preview (credit for the unused time, the new period). */
export async function previewPeriodChange(
  db: Kysely<Database>,
  stripe: Stripe,
  trustId: string,
  to: BillingInterval,
  prorationDate = Math.floor(Date.now() / 1000),
): Promise<PeriodChangePreview> {
  const { sub, item } = await changeableItem(db, stripe, trustId);
  const from = (item.price.recurring?.interval ?? 'month') as BillingInterval;
  if (from === to) {
    throw conflict(`The subscription is already billed ${to === 'year' ? 'yearly' : 'monthly'}; nothing to change.`);
  }
  const prices = await planPrices(stripe);
  const preview = await stripe.invoices.createPreview({
    subscription: sub.id,
    subscription_details: {
      items: [{ id: item.id, price: prices[to] }],
      proration_date: prorationDate,
      proration_behavior: 'create_prorations',
    },
  });
  const schools = item.quantity ?? 1;
  const trialing = sub.status === 'trialing';
  const creditPence = -sumLines(preview, true, prorationDate);
  const newPeriodPence = sumLines(preview, false);
  const dueNowPence = trialing ? 0 : preview.amount_due;
  const renewsPence = PER_SCHOOL_PLAN.unitAmountPence[to] * schools;
  const renewsAt = trialing
    ? (sub.trial_end ?? null)
    : preview.lines.data.find((l) => !l.parent?.subscription_item_details?.proration)?.period.end;
  const renewsOn = renewsAt ? new Date(renewsAt * 1000).toISOString() : null;
  const words = trialing
    ? `Nothing is charged during the free trial. From ${formatDate(renewsOn)} the subscription costs ${formatPence(renewsPence)} ${perPeriod(to)} for ${schoolsWord(schools)} (VAT included).`
    : `Switching to ${to === 'year' ? 'yearly' : 'monthly'} billing starts a new period today: ${formatPence(newPeriodPence)} for ${schoolsWord(schools)}, less ${formatPence(creditPence)} credit for the unused part of the current period, so ${formatPence(dueNowPence)} is charged now (VAT included). It then renews at ${formatPence(renewsPence)} ${perPeriod(to)} on ${formatDate(renewsOn)}.`;
  return {
    from,
    to,
    schools,
    prorationDate,
    creditPence,
    newPeriodPence,
    dueNowPence,
    renewsPence,
    renewsOn,
    trialing,
    words,
  };
}

/**
 * What changing the trust's school count from `schoolsBefore` to `schoolsAfter` does to the subscription, in
 * figures and words, before anything changes. For the register import preview, the school form (add or remove a
 * school) and the billing page. Never throws for a trust without a changeable subscription: it says so instead.
 */
export async function describeSchoolCountChange(
  db: Kysely<Database>,
  stripe: Stripe | null,
  trustId: string,
  schoolsBefore: number,
  schoolsAfter: number,
): Promise<QuantityChangePreview> {
  const account = await getBillingAccount(db, trustId);
  const standing = billingStanding(account);
  const base = {
    schoolsBefore,
    schoolsAfter,
    quantityBefore: account.quantity,
    quantityAfter: account.quantity,
    interval: account.interval,
    prorationPence: 0,
    nextInvoicePence: 0,
    nextInvoiceOn: null,
    perPeriodPence: 0,
  };
  if (standing.effectivePlan === 'free' || !account.subscriptionId || !CHANGEABLE.has(account.status) || !stripe) {
    const words =
      schoolsAfter > FREE_PLAN.maxSchools && standing.effectivePlan === 'free'
        ? `The free ${FREE_PLAN.name} plan covers ${schoolsWord(FREE_PLAN.maxSchools)}; ${schoolsWord(schoolsAfter)} need the ${PER_SCHOOL_PLAN.name} plan (upgrade on the billing page first).`
        : 'Nothing changes in what the trust pays: it has no paid subscription.';
    return { ...base, changes: false, words };
  }
  const { sub, item } = await changeableItem(db, stripe, trustId);
  const interval = (item.price.recurring?.interval ?? 'month') as BillingInterval;
  const quantityBefore = item.quantity ?? account.quantity;
  const quantityAfter = billableSchools(schoolsAfter);
  const unit = PER_SCHOOL_PLAN.unitAmountPence[interval];
  if (quantityAfter === quantityBefore) {
    return {
      ...base,
      quantityBefore,
      quantityAfter,
      interval,
      perPeriodPence: unit * quantityAfter,
      changes: false,
      words: `The subscription stays at ${schoolsWord(quantityAfter)}, ${formatPence(unit * quantityAfter)} ${perPeriod(interval)} (VAT included).`,
    };
  }
  const prorationDate = Math.floor(Date.now() / 1000);
  const preview = await stripe.invoices.createPreview({
    subscription: sub.id,
    subscription_details: {
      items: [{ id: item.id, quantity: quantityAfter }],
      proration_date: prorationDate,
      proration_behavior: 'create_prorations',
    },
  });
  const prorationPence = sumLines(preview, true, prorationDate);
  const at = preview.next_payment_attempt ?? preview.period_end;
  const nextInvoiceOn = at ? new Date(at * 1000).toISOString() : null;
  const perPeriodPence = unit * quantityAfter;
  const more = quantityAfter > quantityBefore;
  const trialing = sub.status === 'trialing';
  const rest = trialing
    ? 'nothing more is charged during the free trial'
    : prorationPence === 0
      ? 'nothing is added for the rest of this period'
      : more
        ? `${formatPence(prorationPence)} is added to the next invoice for the rest of this period`
        : `${formatPence(-prorationPence)} is credited on the next invoice for the rest of this period`;
  const words = `The subscription will change from ${schoolsWord(quantityBefore)} to ${schoolsWord(quantityAfter)}: ${formatPence(unit * quantityBefore)} → ${formatPence(perPeriodPence)} ${perPeriod(interval)} (VAT included); ${rest}. The next invoice, on ${formatDate(nextInvoiceOn)}, will be ${formatPence(preview.amount_due)}.`;
  return {
    schoolsBefore,
    schoolsAfter,
    quantityBefore,
    quantityAfter,
    interval,
    prorationPence,
    nextInvoicePence: preview.amount_due,
    nextInvoiceOn,
    perPeriodPence,
    changes: true,
    words,
  };
}

/**
 * The notice for a write that would add (or, negative, remove) `schoolsAdded` schools — the register import preview
 * and the school form call it before the change. Null when nothing is added, or for a member limited to some schools
 * (the answer counts the whole trust). If the provider cannot be reached, says so rather than failing the preview.
 */
export async function schoolCountNotice(
  db: Kysely<Database>,
  trust: { id: string; schoolIds: string[] | null },
  schoolsAdded: number,
): Promise<QuantityChangePreview | null> {
  if (schoolsAdded === 0 || trust.schoolIds !== null) return null;
  const { schools } = await countEstate(db, trust.id);
  const stripe = providerConfigured() ? paymentProvider() : null;
  try {
    return await describeSchoolCountChange(db, stripe, trust.id, schools, Math.max(0, schools + schoolsAdded));
  } catch (error) {
    console.error('The subscription change could not be priced', error);
    const after = Math.max(0, schools + schoolsAdded);
    return {
      changes: true,
      schoolsBefore: schools,
      schoolsAfter: after,
      quantityBefore: billableSchools(schools),
      quantityAfter: billableSchools(after),
      interval: null,
      prorationPence: 0,
      nextInvoicePence: 0,
      nextInvoiceOn: null,
      perPeriodPence: 0,
      words: `The subscription will change to ${schoolsWord(billableSchools(after))}; its price could not be worked out just now (the billing page shows it).`,
    };
  }
}
