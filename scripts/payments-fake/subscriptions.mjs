// Subscriptions and their invoices: creation with or without a trial, quantity and price changes
// with proration, cancel at period end, renewals that succeed or fail, and the upcoming invoice.
import { ApiError, invalid, missing } from './errors.mjs';
import { bool, int } from './form.mjs';
import { mergeMetadata } from './catalog.mjs';
import { newId, now } from './store.mjs';

const DAY_S = 86_400;
/** How many failed attempts on a renewal invoice before the subscription is marked unpaid. */
export const MAX_RENEWAL_ATTEMPTS = 4;

/** Adds one billing interval to a timestamp the way calendars do (same day next month or year). */
export function addInterval(seconds, interval, count = 1) {
  const date = new Date(seconds * 1000);
  if (interval === 'day') date.setUTCDate(date.getUTCDate() + count);
  else if (interval === 'week') date.setUTCDate(date.getUTCDate() + 7 * count);
  else if (interval === 'month') date.setUTCMonth(date.getUTCMonth() + count);
  else date.setUTCFullYear(date.getUTCFullYear() + count);
  return Math.floor(date.getTime() / 1000);
}

export function createSubscriptions(ctx, catalog) {
  const { state } = ctx;
  let invoiceSeq = Object.keys(state.invoices).length;

  function getSubscription(id, param = 'id') {
    const sub = state.subscriptions[id];
    if (!sub) throw missing('subscription', id, param);
    return sub;
  }

  function getInvoice(id) {
    const invoice = state.invoices[id];
    if (!invoice) throw missing('invoice', id);
    return invoice;
  }

  const periodEnd = (sub) => sub._items[0].current_period_end;
  const periodStart = (sub) => sub._items[0].current_period_start;
  const priceOf = (item) => catalog.getPrice(item.price);

  /** The public shape of a subscription (items carry their full price object). */
  function viewSubscription(sub) {
    const items = sub._items.map((item) => ({ ...item, price: priceOf(item) }));
    const { _items, _pending, ...rest } = sub;
    return {
      ...rest,
      items: {
        object: 'list',
        data: items,
        has_more: false,
        total_count: items.length,
        url: `/v1/subscription_items?subscription=${sub.id}`,
      },
    };
  }

  function paymentMethodFor(sub) {
    const customer = catalog.getCustomer(sub.customer);
    const id = sub.default_payment_method ?? customer.invoice_settings.default_payment_method;
    return id ? (state.payment_methods[id] ?? null) : null;
  }

  function line({ sub, item, amount, description, quantity, start, end, proration }) {
    const price = priceOf(item);
    return {
      id: newId('il'),
      object: 'line_item',
      amount,
      currency: price.currency,
      description,
      discountable: !proration,
      livemode: false,
      metadata: {},
      quantity,
      period: { start, end },
      pricing: {
        type: 'price_details',
        price_details: { price: price.id, product: price.product },
        unit_amount_decimal: String(price.unit_amount),
      },
      parent: {
        type: 'subscription_item_details',
        subscription_item_details: {
          subscription: sub.id,
          subscription_item: item.id,
          proration,
          invoice_item: null,
          proration_details: { credited_items: null },
        },
        invoice_item_details: null,
      },
      subscription: sub.id,
    };
  }

  /** Creates an invoice for `lines`, finalises it and tries to collect it with the subscription's card. */
  function invoice(sub, lines, { reason, start, end }, forced) {
    const customer = catalog.getCustomer(sub.customer);
    const total = lines.reduce((sum, l) => sum + l.amount, 0);
    const due = Math.max(0, total);
    invoiceSeq += 1;
    const created = now();
    const inv = {
      id: newId('in'),
      object: 'invoice',
      account_country: 'GB',
      account_name: 'Payments fake',
      amount_due: due,
      amount_paid: 0,
      amount_remaining: due,
      amount_overpaid: 0,
      amount_shipping: 0,
      attempt_count: 0,
      attempted: false,
      auto_advance: true,
      billing_reason: reason,
      collection_method: 'charge_automatically',
      created,
      currency: lines[0]?.currency ?? 'gbp',
      customer: customer.id,
      customer_email: customer.email,
      customer_name: customer.name,
      description: null,
      hosted_invoice_url: `${ctx.publicUrl}/invoices/${'__ID__'}`,
      invoice_pdf: null,
      livemode: false,
      metadata: {},
      next_payment_attempt: null,
      number: `FAKE-${String(invoiceSeq).padStart(5, '0')}`,
      parent: {
        type: 'subscription_details',
        quote_details: null,
        subscription_details: { subscription: sub.id, metadata: { ...sub.metadata } },
      },
      period_start: start,
      period_end: end,
      starting_balance: 0,
      ending_balance: 0,
      status: 'open',
      status_transitions: { finalized_at: created, paid_at: null, voided_at: null, marked_uncollectible_at: null },
      subtotal: total,
      total,
      lines: null,
    };
    inv.hosted_invoice_url = `${ctx.publicUrl}/invoices/${inv.id}`;
    inv.lines = {
      object: 'list',
      data: lines.map((l) => ({ ...l, invoice: inv.id })),
      has_more: false,
      total_count: lines.length,
      url: `/v1/invoices/${inv.id}/lines`,
    };
    state.invoices[inv.id] = inv;
    sub.latest_invoice = inv.id;
    ctx.emit('invoice.created', inv);
    ctx.emit('invoice.finalized', inv);
    collect(sub, inv, forced);
    return inv;
  }

  /** One collection attempt on an open invoice; `forced` overrides the card ('succeed' | 'fail'). */
  function collect(sub, inv, forced) {
    if (inv.amount_due === 0) return markPaid(inv);
    const pm = paymentMethodFor(sub);
    const succeeds = forced ? forced === 'succeed' : Boolean(pm && pm._behaviour === 'ok');
    inv.attempt_count += 1;
    inv.attempted = true;
    if (succeeds) return markPaid(inv);
    inv.next_payment_attempt = inv.attempt_count >= MAX_RENEWAL_ATTEMPTS ? null : now() + 3 * DAY_S;
    ctx.emit('invoice.payment_failed', inv);
    return false;
  }

  function markPaid(inv) {
    inv.status = 'paid';
    inv.amount_paid = inv.amount_due;
    inv.amount_remaining = 0;
    inv.next_payment_attempt = null;
    inv.status_transitions.paid_at = now();
    ctx.emit('invoice.paid', inv);
    if (inv.amount_due > 0) ctx.emit('invoice.payment_succeeded', inv);
    return true;
  }

  function snapshot(sub) {
    return JSON.parse(JSON.stringify(viewSubscription(sub)));
  }

  /** The fields of `before` that differ from the subscription now (the event's previous_attributes). */
  function changed(before, sub) {
    const after = viewSubscription(sub);
    const previous = {};
    for (const key of Object.keys(before)) {
      if (JSON.stringify(before[key]) !== JSON.stringify(after[key])) previous[key] = before[key];
    }
    return previous;
  }

  function emitUpdated(sub, before) {
    const previous = changed(before, sub);
    if (Object.keys(previous).length > 0) ctx.emit('customer.subscription.updated', viewSubscription(sub), previous);
  }

  function createSubscription(params, { paymentMethod } = {}) {
    const customer = catalog.getCustomer(params.customer, 'customer');
    const items = params.items ?? [];
    if (items.length === 0) throw invalid('Missing required param: items.', 'items');
    const created = now();
    const trialDays = int(params.trial_period_days);
    const trialEndParam = int(params.trial_end);
    const trialEnd = trialEndParam ?? (trialDays ? created + trialDays * DAY_S : null);
    const sub = {
      id: newId('sub'),
      object: 'subscription',
      application: null,
      billing_cycle_anchor: trialEnd ?? created,
      cancel_at: null,
      cancel_at_period_end: false,
      canceled_at: null,
      cancellation_details: { comment: null, feedback: null, reason: null },
      collection_method: 'charge_automatically',
      created,
      currency: null,
      customer: customer.id,
      default_payment_method: paymentMethod ?? params.default_payment_method ?? null,
      description: params.description ?? null,
      ended_at: null,
      latest_invoice: null,
      livemode: false,
      metadata: params.metadata ?? {},
      pending_update: null,
      schedule: null,
      start_date: created,
      status: 'incomplete',
      test_clock: null,
      trial_end: trialEnd,
      trial_start: trialEnd ? created : null,
      _items: [],
      _pending: [],
    };
    if (sub.default_payment_method && !state.payment_methods[sub.default_payment_method]) {
      sub.default_payment_method = catalog.paymentMethodFromToken(sub.default_payment_method, customer.id).id;
    }
    for (const [index, item] of items.entries()) {
      const price = catalog.getPrice(item.price, `items[${index}][price]`);
      if (!price.recurring)
        throw invalid(
          'The price specified is not a recurring price; subscriptions need recurring prices.',
          `items[${index}][price]`,
        );
      const quantity = int(item.quantity) ?? 1;
      if (Number.isNaN(quantity) || quantity < 0)
        throw invalid('Quantity must be a non-negative integer.', `items[${index}][quantity]`);
      sub._items.push({
        id: newId('si'),
        object: 'subscription_item',
        created,
        metadata: {},
        price: price.id,
        quantity,
        subscription: sub.id,
        current_period_start: created,
        current_period_end: trialEnd ?? addInterval(created, price.recurring.interval, price.recurring.interval_count),
      });
      sub.currency = price.currency;
    }
    if (!paymentMethodFor(sub) && !trialEnd && params.payment_behavior === 'error_if_incomplete') {
      throw invalid('This customer has no attached payment source or default payment method.', 'customer');
    }
    state.subscriptions[sub.id] = sub;
    const lines = sub._items.map((item) => {
      const price = priceOf(item);
      const amount = trialEnd ? 0 : price.unit_amount * item.quantity;
      const description = trialEnd
        ? `Trial period for ${productName(price)}`
        : `${item.quantity} × ${productName(price)}`;
      return line({
        sub,
        item,
        amount,
        description,
        quantity: item.quantity,
        start: created,
        end: periodEnd(sub),
        proration: false,
      });
    });
    const inv = invoice(sub, lines, { reason: 'subscription_create', start: created, end: created });
    if (inv.status === 'paid') sub.status = trialEnd ? 'trialing' : 'active';
    else if (params.payment_behavior === 'error_if_incomplete') {
      delete state.subscriptions[sub.id];
      throw new ApiError(402, {
        type: 'card_error',
        code: 'card_declined',
        decline_code: 'generic_decline',
        message: 'Your card was declined.',
      });
    }
    ctx.emit('customer.subscription.created', viewSubscription(sub));
    return sub;
  }

  function productName(price) {
    return state.products[price.product]?.name ?? price.nickname ?? price.id;
  }

  /** Proration lines for replacing (oldPrice × oldQty) by (newPrice × newQty) for the rest of the period. */
  function prorationLines(sub, item, oldPrice, oldQty, newPrice, newQty, at) {
    const start = periodStart(sub);
    const end = periodEnd(sub);
    const fraction = Math.max(0, Math.min(1, (end - at) / Math.max(1, end - start)));
    const when = new Date(at * 1000).toISOString().slice(0, 10);
    const credit = -Math.round(oldPrice.unit_amount * oldQty * fraction);
    const charge = Math.round(newPrice.unit_amount * newQty * fraction);
    return [
      line({
        sub,
        item,
        amount: credit,
        description: `Unused time on ${oldQty} × ${productName(oldPrice)} after ${when}`,
        quantity: oldQty,
        start: at,
        end,
        proration: true,
      }),
      line({
        sub,
        item,
        amount: charge,
        description: `Remaining time on ${newQty} × ${productName(newPrice)} after ${when}`,
        quantity: newQty,
        start: at,
        end,
        proration: true,
      }),
    ];
  }

  function updateSubscription(id, params) {
    const sub = getSubscription(id);
    if (sub.status === 'canceled' || sub.status === 'incomplete_expired') {
      throw invalid('A canceled subscription can only update its cancellation_details and metadata.');
    }
    const before = snapshot(sub);
    const at = int(params.proration_date) ?? now();
    if (Number.isNaN(at)) throw invalid('proration_date must be a Unix timestamp.', 'proration_date');
    if (params.metadata) sub.metadata = mergeMetadata(sub.metadata, params.metadata);
    if (params.default_payment_method) {
      sub.default_payment_method = catalog.paymentMethodFromToken(params.default_payment_method, sub.customer).id;
    }
    if (params.cancel_at_period_end !== undefined) {
      sub.cancel_at_period_end = bool(params.cancel_at_period_end);
      sub.cancel_at = sub.cancel_at_period_end ? periodEnd(sub) : null;
      sub.canceled_at = sub.cancel_at_period_end ? at : null;
      sub.cancellation_details = {
        comment: null,
        feedback: null,
        reason: sub.cancel_at_period_end ? 'cancellation_requested' : null,
      };
    }
    const behaviour = params.proration_behavior ?? 'create_prorations';
    if (!['create_prorations', 'none', 'always_invoice'].includes(behaviour)) {
      throw invalid(
        'proration_behavior must be one of create_prorations, none or always_invoice.',
        'proration_behavior',
      );
    }
    for (const [index, change] of (params.items ?? []).entries()) {
      const item = sub._items.find((i) => i.id === change.id);
      if (!item) throw missing('subscription item', change.id, `items[${index}][id]`);
      const oldPrice = priceOf(item);
      const newPrice = change.price ? catalog.getPrice(change.price, `items[${index}][price]`) : oldPrice;
      const newQty = change.quantity !== undefined ? int(change.quantity) : item.quantity;
      if (Number.isNaN(newQty) || newQty < 0)
        throw invalid('Quantity must be a non-negative integer.', `items[${index}][quantity]`);
      if (newPrice.id === oldPrice.id && newQty === item.quantity) continue;
      const intervalChanges = newPrice.recurring.interval !== oldPrice.recurring.interval;
      const oldQty = item.quantity;
      item.price = newPrice.id;
      item.quantity = newQty;
      if (sub.status === 'trialing') continue; // nothing is charged during a trial
      if (intervalChanges) {
        // A new interval restarts the billing cycle now: credit the unused time, charge the new period.
        const lines = prorationLines(sub, item, oldPrice, oldQty, newPrice, 0, at).slice(0, 1);
        item.current_period_start = at;
        item.current_period_end = addInterval(at, newPrice.recurring.interval, newPrice.recurring.interval_count);
        sub.billing_cycle_anchor = at;
        lines.push(
          line({
            sub,
            item,
            amount: newPrice.unit_amount * newQty,
            description: `${newQty} × ${productName(newPrice)}`,
            quantity: newQty,
            start: at,
            end: item.current_period_end,
            proration: false,
          }),
        );
        const inv = invoice(sub, [...sub._pending.splice(0), ...lines], {
          reason: 'subscription_update',
          start: at,
          end: at,
        });
        if (inv.status !== 'paid') sub.status = 'past_due';
        if (sub.cancel_at_period_end) sub.cancel_at = periodEnd(sub);
        continue;
      }
      if (behaviour === 'none') continue;
      const lines = prorationLines(sub, item, oldPrice, oldQty, newPrice, newQty, at);
      if (behaviour === 'always_invoice') {
        const inv = invoice(sub, [...sub._pending.splice(0), ...lines], {
          reason: 'subscription_update',
          start: at,
          end: at,
        });
        if (inv.status !== 'paid') sub.status = 'past_due';
      } else {
        sub._pending.push(...lines);
      }
    }
    emitUpdated(sub, before);
    return sub;
  }

  function cancelSubscription(id) {
    const sub = getSubscription(id);
    if (sub.status === 'canceled') throw invalid(`This subscription (${id}) has already been canceled.`);
    const at = now();
    sub.status = 'canceled';
    sub.canceled_at ??= at;
    sub.ended_at = at;
    sub.cancel_at_period_end = false;
    ctx.emit('customer.subscription.deleted', viewSubscription(sub));
    return sub;
  }

  /**
   * Simulates the end of the current period: a trial ends or a period renews and the card is charged,
   * or, when a renewal is unpaid, the provider retries it. `outcome` forces the charge to 'succeed' or
   * 'fail' (otherwise the card on file decides). After MAX_RENEWAL_ATTEMPTS failures the subscription
   * becomes `unpaid`; paying the open invoice makes it active again.
   */
  function renew(id, outcome) {
    const sub = getSubscription(id);
    const before = snapshot(sub);
    const open = Object.values(state.invoices).find(
      (i) => i.parent?.subscription_details?.subscription === sub.id && i.status === 'open',
    );
    if (sub.status === 'canceled') throw invalid('A canceled subscription does not renew.');
    if (open) {
      const paid = collect(sub, open, outcome);
      sub.status = paid ? 'active' : open.attempt_count >= MAX_RENEWAL_ATTEMPTS ? 'unpaid' : 'past_due';
      emitUpdated(sub, before);
      return sub;
    }
    const end = periodEnd(sub);
    if (sub.cancel_at_period_end) {
      sub.status = 'canceled';
      sub.ended_at = end;
      sub.cancel_at_period_end = false;
      ctx.emit('customer.subscription.deleted', viewSubscription(sub));
      return sub;
    }
    const lines = [...sub._pending.splice(0)];
    for (const item of sub._items) {
      const price = priceOf(item);
      item.current_period_start = end;
      item.current_period_end = addInterval(end, price.recurring.interval, price.recurring.interval_count);
      lines.push(
        line({
          sub,
          item,
          amount: price.unit_amount * item.quantity,
          description: `${item.quantity} × ${productName(price)}`,
          quantity: item.quantity,
          start: end,
          end: item.current_period_end,
          proration: false,
        }),
      );
    }
    const inv = invoice(sub, lines, { reason: 'subscription_cycle', start: end, end }, outcome);
    sub.status = inv.status === 'paid' ? 'active' : 'past_due';
    emitUpdated(sub, before);
    return sub;
  }

  /** Pays an open invoice with a card (which becomes the subscription's default); a paid renewal reactivates it. */
  function payInvoice(id, paymentMethodId) {
    const inv = getInvoice(id);
    if (inv.status !== 'open') throw invalid(`Invoice ${id} is ${inv.status}; only open invoices can be paid.`);
    const sub = getSubscription(inv.parent.subscription_details.subscription);
    const before = snapshot(sub);
    if (paymentMethodId) sub.default_payment_method = catalog.paymentMethodFromToken(paymentMethodId, sub.customer).id;
    const paid = collect(sub, inv);
    if (!paid)
      throw new ApiError(402, {
        type: 'card_error',
        code: 'card_declined',
        decline_code: 'generic_decline',
        message: 'Your card was declined.',
      });
    const stillOpen = Object.values(state.invoices).some(
      (i) => i.parent?.subscription_details?.subscription === sub.id && i.status === 'open',
    );
    if (!stillOpen && (sub.status === 'past_due' || sub.status === 'unpaid')) sub.status = 'active';
    emitUpdated(sub, before);
    return inv;
  }

  /**
   * The invoice the subscription will produce at the end of the current period (nothing is stored), or, with
   * `subscription_details[items]`, the invoice a proposed change would produce: `proration_date` (default now) and
   * `proration_behavior` as for an update. A change of interval restarts the cycle, so its preview is the invoice
   * raised at once (credit for the unused time, the new period in full); other changes preview the next renewal
   * with the proration lines (or, with always_invoice, the prorations invoiced at once).
   */
  function previewInvoice(params) {
    const sub = params.subscription
      ? getSubscription(params.subscription, 'subscription')
      : Object.values(state.subscriptions).find((s) => s.customer === params.customer && s.status !== 'canceled');
    const details = params.subscription_details ?? {};
    const changes = details.items ?? [];
    if (!sub || sub.status === 'canceled' || (sub.cancel_at_period_end && changes.length === 0)) {
      throw new ApiError(400, {
        type: 'invalid_request_error',
        code: 'invoice_upcoming_none',
        message: 'No upcoming invoices for customer',
      });
    }
    const at = int(details.proration_date) ?? now();
    if (Number.isNaN(at))
      throw invalid('proration_date must be a Unix timestamp.', 'subscription_details[proration_date]');
    const behaviour = details.proration_behavior ?? 'create_prorations';
    if (!['create_prorations', 'none', 'always_invoice'].includes(behaviour)) {
      throw invalid(
        'proration_behavior must be one of create_prorations, none or always_invoice.',
        'subscription_details[proration_behavior]',
      );
    }
    // The items as they would be after the change (nothing is stored).
    const items = sub._items.map((item) => ({ ...item }));
    const prorations = [];
    let resetAt = null;
    for (const [index, change] of changes.entries()) {
      const item = items.find((i) => i.id === change.id);
      if (!item) throw missing('subscription item', change.id, `subscription_details[items][${index}][id]`);
      const oldPrice = priceOf(item);
      const oldQty = item.quantity;
      const newPrice = change.price
        ? catalog.getPrice(change.price, `subscription_details[items][${index}][price]`)
        : oldPrice;
      const newQty = change.quantity !== undefined ? int(change.quantity) : oldQty;
      if (Number.isNaN(newQty) || newQty < 0)
        throw invalid('Quantity must be a non-negative integer.', `subscription_details[items][${index}][quantity]`);
      item.price = newPrice.id;
      item.quantity = newQty;
      if (sub.status === 'trialing' || (newPrice.id === oldPrice.id && newQty === oldQty)) continue;
      if (newPrice.recurring.interval !== oldPrice.recurring.interval) {
        prorations.push(...prorationLines(sub, item, oldPrice, oldQty, newPrice, 0, at).slice(0, 1));
        resetAt = at;
        item.current_period_start = at;
        item.current_period_end = addInterval(at, newPrice.recurring.interval, newPrice.recurring.interval_count);
        continue;
      }
      if (behaviour !== 'none') prorations.push(...prorationLines(sub, item, oldPrice, oldQty, newPrice, newQty, at));
    }
    const immediate = resetAt !== null || (behaviour === 'always_invoice' && prorations.length > 0);
    const lines = [...sub._pending, ...prorations];
    if (!immediate || resetAt !== null) {
      for (const item of items) {
        const price = priceOf(item);
        const start = resetAt ?? periodEnd(sub);
        const next =
          resetAt !== null
            ? item.current_period_end
            : addInterval(start, price.recurring.interval, price.recurring.interval_count);
        lines.push(
          line({
            sub,
            item,
            amount: price.unit_amount * item.quantity,
            description: `${item.quantity} × ${productName(price)}`,
            quantity: item.quantity,
            start,
            end: next,
            proration: false,
          }),
        );
      }
    }
    const when = immediate ? at : periodEnd(sub);
    const total = lines.reduce((sum, l) => sum + l.amount, 0);
    return {
      id: `upcoming_in_${sub.id.slice(4)}`,
      object: 'invoice',
      amount_due: Math.max(0, total),
      amount_paid: 0,
      amount_remaining: Math.max(0, total),
      attempt_count: 0,
      billing_reason: immediate ? 'subscription_update' : 'upcoming',
      collection_method: 'charge_automatically',
      created: when,
      currency: sub.currency,
      customer: sub.customer,
      lines: {
        object: 'list',
        data: lines,
        has_more: false,
        total_count: lines.length,
        url: '/v1/invoices/upcoming/lines',
      },
      livemode: false,
      next_payment_attempt: when,
      parent: {
        type: 'subscription_details',
        quote_details: null,
        subscription_details: { subscription: sub.id, metadata: { ...sub.metadata } },
      },
      period_start: immediate ? at : periodStart(sub),
      period_end: immediate ? at : periodEnd(sub),
      starting_balance: 0,
      status: 'draft',
      subscription_proration_date: changes.length > 0 ? at : undefined,
      subtotal: total,
      total,
    };
  }

  /**
   * Test helper: moves the current period back so that it began `days` days ago (as if that much time had passed
   * since the period began); prorations then fall mid-period.
   */
  function backdate(id, days) {
    const sub = getSubscription(id);
    const n = int(days);
    if (n === undefined || Number.isNaN(n) || n < 0)
      throw invalid('days must be a whole number of days, 0 or more.', 'days');
    for (const item of sub._items) {
      const price = priceOf(item);
      item.current_period_start = now() - n * DAY_S;
      item.current_period_end = addInterval(
        item.current_period_start,
        price.recurring.interval,
        price.recurring.interval_count,
      );
    }
    sub.billing_cycle_anchor = sub._items[0]?.current_period_start ?? sub.billing_cycle_anchor;
    return sub;
  }

  function listInvoices(query) {
    let invoices = Object.values(state.invoices);
    if (query.customer) invoices = invoices.filter((i) => i.customer === query.customer);
    if (query.subscription)
      invoices = invoices.filter((i) => i.parent?.subscription_details?.subscription === query.subscription);
    if (query.status) invoices = invoices.filter((i) => i.status === query.status);
    return invoices.sort((a, b) => b.created - a.created || b.number.localeCompare(a.number));
  }

  function listSubscriptions(query) {
    let subs = Object.values(state.subscriptions);
    if (query.customer) subs = subs.filter((s) => s.customer === query.customer);
    if (query.status && query.status !== 'all') subs = subs.filter((s) => s.status === query.status);
    else if (!query.status) subs = subs.filter((s) => s.status !== 'canceled');
    return subs.sort((a, b) => b.created - a.created);
  }

  return {
    getSubscription,
    viewSubscription,
    createSubscription,
    updateSubscription,
    cancelSubscription,
    renew,
    previewInvoice,
    backdate,
    getInvoice,
    listInvoices,
    listSubscriptions,
    payInvoice,
  };
}
