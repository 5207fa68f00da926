// Checkout sessions and the hosted checkout page where a test card is entered.
import { ApiError, invalid, missing } from './errors.mjs';
import { int } from './form.mjs';
import { newId, now } from './store.mjs';

export function createCheckout(ctx, catalog, subscriptions) {
  const { state } = ctx;

  function getSession(id) {
    const session = state.checkout_sessions[id];
    if (!session) throw missing('checkout.session', id);
    return session;
  }

  function createSession(params) {
    if (params.mode !== 'subscription') throw invalid('This payments fake supports mode=subscription only.', 'mode');
    if (!params.success_url) throw invalid('Missing required param: success_url.', 'success_url');
    const lineItems = params.line_items ?? [];
    if (lineItems.length === 0) throw invalid('Missing required param: line_items.', 'line_items');
    if (params.customer) catalog.getCustomer(params.customer, 'customer');
    let amountTotal = 0;
    let currency = null;
    const items = lineItems.map((li, index) => {
      const price = catalog.getPrice(li.price, `line_items[${index}][price]`);
      if (!price.recurring)
        throw invalid('In subscription mode every line item needs a recurring price.', `line_items[${index}][price]`);
      const quantity = int(li.quantity) ?? 1;
      if (Number.isNaN(quantity) || quantity < 1)
        throw invalid('Quantity must be a positive integer.', `line_items[${index}][quantity]`);
      amountTotal += price.unit_amount * quantity;
      currency = price.currency;
      return { price: price.id, quantity };
    });
    const trialDays = int(params.subscription_data?.trial_period_days);
    const created = now();
    const session = {
      id: newId('cs_test'),
      object: 'checkout.session',
      amount_subtotal: amountTotal,
      amount_total: trialDays ? 0 : amountTotal,
      cancel_url: params.cancel_url ?? null,
      client_reference_id: params.client_reference_id ?? null,
      created,
      currency,
      customer: params.customer ?? null,
      customer_email: params.customer_email ?? null,
      expires_at: int(params.expires_at) ?? created + 24 * 3600,
      livemode: false,
      metadata: params.metadata ?? {},
      mode: 'subscription',
      payment_status: 'unpaid',
      status: 'open',
      subscription: null,
      success_url: params.success_url,
      url: null,
      _items: items,
      _subscriptionData: params.subscription_data ?? {},
      _lastError: null,
    };
    session.url = `${ctx.publicUrl}/checkout/${session.id}`;
    state.checkout_sessions[session.id] = session;
    return session;
  }

  function expireSession(id) {
    const session = getSession(id);
    if (session.status !== 'open')
      throw invalid(`Only open checkout sessions can be expired; this one is ${session.status}.`);
    session.status = 'expired';
    session.url = null;
    ctx.emit('checkout.session.expired', session);
    return session;
  }

  /** Pays a session with a card from the hosted page; returns the URL to send the browser to. */
  function completeSession(id, form) {
    const session = getSession(id);
    if (session.status !== 'open' || session.expires_at < now()) {
      throw invalid('This checkout session is no longer open. Go back to the site and start again.');
    }
    let customerId = session.customer;
    const pm = catalog.createCardPaymentMethod(form.cardNumber, { customer: customerId });
    if (!customerId) {
      customerId = catalog.createCustomer({ email: form.email || session.customer_email, name: form.name || null }).id;
      pm.customer = customerId;
    }
    const customer = catalog.getCustomer(customerId);
    customer.invoice_settings.default_payment_method = pm.id;
    pm.billing_details = { email: form.email || customer.email, name: form.name || null };
    const data = session._subscriptionData;
    const sub = subscriptions.createSubscription(
      {
        customer: customerId,
        items: session._items,
        trial_period_days: data.trial_period_days,
        metadata: data.metadata ?? {},
        payment_behavior: 'error_if_incomplete',
      },
      { paymentMethod: pm.id },
    );
    Object.assign(session, {
      status: 'complete',
      customer: customerId,
      customer_email: customer.email,
      subscription: sub.id,
      payment_status: session.amount_total === 0 ? 'no_payment_required' : 'paid',
      url: null,
    });
    ctx.emit('checkout.session.completed', session);
    return session.success_url.replaceAll('{CHECKOUT_SESSION_ID}', session.id);
  }

  return { getSession, createSession, expireSession, completeSession };
}

const escapeHtml = (s) =>
  String(s ?? '').replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c],
  );
const money = (pence, currency) =>
  `${currency === 'gbp' ? '£' : `${String(currency).toUpperCase()} `}${(pence / 100).toFixed(2)}`;

/** The hosted checkout page: what is being bought, a card form, and the test cards to use. */
export function renderCheckoutPage(session, catalog, state, errorMessage = null) {
  const rows = session._items
    .map((item) => {
      const price = catalog.getPrice(item.price);
      const product = state.products[price.product]?.name ?? 'Subscription';
      return `<tr><td>${escapeHtml(product)}</td><td>${item.quantity} × ${money(price.unit_amount, price.currency)} / ${price.recurring.interval}</td><td>${money(price.unit_amount * item.quantity, price.currency)}</td></tr>`;
    })
    .join('');
  const trialDays = Number(session._subscriptionData?.trial_period_days ?? 0);
  const customer = session.customer ? state.customers[session.customer] : null;
  const email = customer?.email ?? session.customer_email ?? '';
  const closed = session.status !== 'open';
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Checkout (test mode)</title>
<style>
  body { font: 16px/1.5 system-ui, sans-serif; margin: 0; background: #f3f4f1; color: #1d2321; }
  main { max-width: 30rem; margin: 2rem auto; background: #fff; padding: 1.5rem 2rem; border-radius: 10px; box-shadow: 0 1px 3px #0002; }
  .mode { background: #fff4d6; border: 1px solid #e6c465; padding: .4rem .7rem; border-radius: 6px; font-size: .9rem; }
  table { width: 100%; border-collapse: collapse; margin: 1rem 0; font-size: .95rem; } td { padding: .3rem 0; }
  label { display: block; margin-top: .8rem; font-weight: 600; font-size: .9rem; }
  input { width: 100%; box-sizing: border-box; padding: .55rem; font: inherit; border: 1px solid #9aa39f; border-radius: 6px; }
  .row { display: flex; gap: .8rem; } .row > div { flex: 1; }
  button { margin-top: 1.2rem; width: 100%; padding: .7rem; font: inherit; font-weight: 700; color: #fff; background: #245c4f; border: 0; border-radius: 6px; cursor: pointer; }
  .error { background: #fde8e6; border: 1px solid #d9776b; color: #7c1d12; padding: .6rem .8rem; border-radius: 6px; margin-top: 1rem; }
  .hint { font-size: .85rem; color: #4f5955; }
</style></head>
<body><main>
  <p class="mode">Test mode: this is a local payments fake. No real card is charged.</p>
  <h1 style="font-size:1.3rem">Subscribe</h1>
  <table>${rows}</table>
  ${trialDays ? `<p><strong>${trialDays}-day free trial.</strong> Nothing is charged today; the first payment is taken when the trial ends.</p>` : `<p>Due today: <strong>${money(session.amount_total, session.currency)}</strong></p>`}
  ${
    closed
      ? `<p class="error" role="alert">This checkout session is ${escapeHtml(session.status)}. Go back to the site and start again.</p>`
      : `
  <form method="post" action="/checkout/${escapeHtml(session.id)}">
    ${errorMessage ? `<p class="error" role="alert" data-testid="checkout-error">${escapeHtml(errorMessage)}</p>` : ''}
    <label for="email">E-mail</label><input id="email" name="email" type="email" value="${escapeHtml(email)}" required>
    <label for="cardNumber">Card number</label><input id="cardNumber" name="cardNumber" inputmode="numeric" autocomplete="cc-number" placeholder="4242 4242 4242 4242" required>
    <div class="row"><div><label for="expiry">Expiry (MM / YY)</label><input id="expiry" name="expiry" placeholder="12 / 34" required></div>
    <div><label for="cvc">CVC</label><input id="cvc" name="cvc" inputmode="numeric" placeholder="123" required></div></div>
    <label for="name">Name on card</label><input id="name" name="name" autocomplete="cc-name">
    <button type="submit">${trialDays ? 'Start trial' : 'Pay and subscribe'}</button>
    <p class="hint">Test cards: 4242 4242 4242 4242 succeeds; 4000 0000 0000 0002 is declined; 4000 0000 0000 0341 is accepted but later renewals fail.</p>
  </form>
  ${session.cancel_url ? `<p><a href="${escapeHtml(session.cancel_url)}">Cancel and go back</a></p>` : ''}`
  }
</main></body></html>`;
}

/** The hosted invoice page: the lines, and for an unpaid invoice a card form to pay it. */
export function renderInvoicePage(invoice, errorMessage = null) {
  const rows = invoice.lines.data
    .map(
      (l) =>
        `<tr><td>${escapeHtml(l.description)}</td><td style="text-align:right">${money(l.amount, l.currency)}</td></tr>`,
    )
    .join('');
  const payForm =
    invoice.status !== 'open'
      ? ''
      : `
<form method="post" action="/invoices/${escapeHtml(invoice.id)}" style="margin-top:1.5rem">
  ${errorMessage ? `<p role="alert" data-testid="invoice-error" style="background:#fde8e6;padding:.5rem .7rem;border-radius:6px">${escapeHtml(errorMessage)}</p>` : ''}
  <h2 style="font-size:1.1rem">Pay ${money(invoice.amount_remaining, invoice.currency)} now</h2>
  <label for="cardNumber">Card number</label><br><input id="cardNumber" name="cardNumber" inputmode="numeric" placeholder="4242 4242 4242 4242" required style="width:100%;padding:.5rem;box-sizing:border-box"><br>
  <label for="expiry">Expiry (MM / YY)</label><br><input id="expiry" name="expiry" placeholder="12 / 34" required style="padding:.5rem"><br>
  <label for="cvc">CVC</label><br><input id="cvc" name="cvc" placeholder="123" required style="padding:.5rem"><br>
  <button type="submit" style="margin-top:.8rem;padding:.6rem 1rem;font-weight:700;color:#fff;background:#245c4f;border:0;border-radius:6px">Pay invoice</button>
  <p style="font-size:.85rem;color:#4f5955">Test cards: 4242 4242 4242 4242 succeeds; 4000 0000 0000 0002 is declined. The card becomes the subscription's card for later renewals.</p>
</form>`;
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Invoice ${escapeHtml(invoice.number)}</title>
<style>body{font:16px/1.5 system-ui,sans-serif;max-width:36rem;margin:2rem auto;padding:0 1rem}table{width:100%;border-collapse:collapse}td{padding:.3rem 0;border-bottom:1px solid #ddd}</style></head>
<body><p>Test mode: local payments fake.</p><h1>Invoice ${escapeHtml(invoice.number)}</h1>
<p>Status: <strong data-testid="invoice-status">${invoice.status === 'open' ? 'unpaid' : escapeHtml(invoice.status)}</strong> · issued ${new Date(invoice.created * 1000).toISOString().slice(0, 10)}</p>
<table>${rows}<tr><td><strong>Total</strong></td><td style="text-align:right"><strong>${money(invoice.total, invoice.currency)}</strong></td></tr></table>
${invoice.status === 'paid' ? '<p>Paid. Thank you: you can close this page and go back to the site.</p>' : ''}${payForm}
</body></html>`;
}

/** Turns an ApiError from a card into the message shown on the page. */
export function checkoutErrorMessage(error) {
  if (error instanceof ApiError) return error.body.message;
  return 'Something went wrong. Please try again.';
}
