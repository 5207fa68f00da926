// Customers, payment methods, products and prices: the objects subscriptions are built from.
import { invalid, missing, declined } from './errors.mjs';
import { int } from './form.mjs';
import { newId, now } from './store.mjs';

/**
 * Test cards, as the provider documents them: 4242… succeeds; 4000…0002 is declined when entered;
 * 4000…9995 is declined for insufficient funds; 4000…0341 is accepted but every later charge fails.
 */
const TEST_CARDS = {
  4242424242424242: { brand: 'visa', behaviour: 'ok' },
  5555555555554444: { brand: 'mastercard', behaviour: 'ok' },
  4000000000000002: { brand: 'visa', behaviour: 'decline', declineCode: 'generic_decline' },
  4000000000009995: {
    brand: 'visa',
    behaviour: 'decline',
    declineCode: 'insufficient_funds',
    message: 'Your card has insufficient funds.',
  },
  4000000000000341: { brand: 'visa', behaviour: 'charge_fails' },
};

/** Payment-method tokens the provider's docs use in tests, mapped to a card number. */
const TEST_TOKENS = {
  pm_card_visa: '4242424242424242',
  pm_card_mastercard: '5555555555554444',
  pm_card_visa_chargeDeclined: '4000000000000002',
  pm_card_chargeCustomerFail: '4000000000000341',
};

export function createCatalog(ctx) {
  const { state } = ctx;

  /** Creates a card payment method from a test card number; a declining number throws a card error. */
  function createCardPaymentMethod(number, { customer = null, expMonth = 12, expYear = 2034 } = {}) {
    const digits = String(number ?? '').replace(/\D/g, '');
    const card = TEST_CARDS[digits];
    if (!card) {
      const error = declined(
        'incorrect_number',
        'Your card number is incorrect. In test mode use a test card such as 4242 4242 4242 4242.',
      );
      error.body.code = 'incorrect_number';
      delete error.body.decline_code;
      throw error;
    }
    if (card.behaviour === 'decline') throw declined(card.declineCode, card.message);
    const pm = {
      id: newId('pm'),
      object: 'payment_method',
      type: 'card',
      card: {
        brand: card.brand,
        last4: digits.slice(-4),
        exp_month: expMonth,
        exp_year: expYear,
        country: 'GB',
        funding: 'credit',
      },
      billing_details: { email: null, name: null },
      customer,
      created: now(),
      livemode: false,
      metadata: {},
      _behaviour: card.behaviour,
    };
    state.payment_methods[pm.id] = pm;
    return pm;
  }

  function paymentMethodFromToken(token, customer) {
    if (state.payment_methods[token]) return state.payment_methods[token];
    const number = TEST_TOKENS[token];
    if (!number) throw missing('PaymentMethod', token, 'payment_method');
    return createCardPaymentMethod(number, { customer });
  }

  function createCustomer(params) {
    const customer = {
      id: newId('cus'),
      object: 'customer',
      email: params.email ?? null,
      name: params.name ?? null,
      description: params.description ?? null,
      metadata: params.metadata ?? {},
      invoice_settings: { default_payment_method: null, custom_fields: null, footer: null, rendering_options: null },
      currency: null,
      balance: 0,
      delinquent: false,
      created: now(),
      livemode: false,
      test_clock: null,
    };
    state.customers[customer.id] = customer;
    if (params.payment_method) {
      const pm = paymentMethodFromToken(params.payment_method, customer.id);
      pm.customer = customer.id;
      customer.invoice_settings.default_payment_method = pm.id;
    }
    const chosen = params.invoice_settings?.default_payment_method;
    if (chosen) customer.invoice_settings.default_payment_method = paymentMethodFromToken(chosen, customer.id).id;
    ctx.emit('customer.created', customer);
    return customer;
  }

  function updateCustomer(id, params) {
    const customer = getCustomer(id);
    const before = { email: customer.email, name: customer.name, metadata: { ...customer.metadata } };
    if (params.email !== undefined) customer.email = params.email || null;
    if (params.name !== undefined) customer.name = params.name || null;
    if (params.metadata) customer.metadata = mergeMetadata(customer.metadata, params.metadata);
    const chosen = params.invoice_settings?.default_payment_method;
    if (chosen) customer.invoice_settings.default_payment_method = paymentMethodFromToken(chosen, customer.id).id;
    ctx.emit('customer.updated', customer, before);
    return customer;
  }

  function getCustomer(id, param = 'id') {
    const customer = state.customers[id];
    if (!customer || customer.deleted) throw missing('customer', id, param);
    return customer;
  }

  function createProduct(params) {
    if (!params.name) throw invalid('Missing required param: name.', 'name');
    const product = {
      id: params.id ?? newId('prod'),
      object: 'product',
      active: params.active === undefined ? true : params.active !== 'false',
      name: params.name,
      description: params.description ?? null,
      metadata: params.metadata ?? {},
      created: now(),
      updated: now(),
      livemode: false,
    };
    state.products[product.id] = product;
    ctx.emit('product.created', product);
    return product;
  }

  function createPrice(params) {
    let productId = params.product;
    if (!productId && params.product_data) productId = createProduct(params.product_data).id;
    if (!productId) throw invalid('Missing required param: product.', 'product');
    if (!state.products[productId]) throw missing('product', productId, 'product');
    const unitAmount = int(params.unit_amount);
    if (unitAmount === undefined || Number.isNaN(unitAmount) || unitAmount < 0)
      throw invalid('unit_amount must be a non-negative integer.', 'unit_amount');
    if (!params.currency) throw invalid('Missing required param: currency.', 'currency');
    const interval = params.recurring?.interval;
    if (interval && !['day', 'week', 'month', 'year'].includes(interval))
      throw invalid('recurring[interval] must be day, week, month or year.', 'recurring[interval]');
    if (params.lookup_key) {
      const holder = Object.values(state.prices).find((p) => p.lookup_key === params.lookup_key);
      if (holder && params.transfer_lookup_key !== 'true') {
        throw invalid(`A price (\`${holder.id}\`) already uses that lookup key.`, 'lookup_key');
      }
      if (holder) holder.lookup_key = null;
    }
    const price = {
      id: newId('price'),
      object: 'price',
      active: true,
      billing_scheme: 'per_unit',
      currency: params.currency.toLowerCase(),
      unit_amount: unitAmount,
      unit_amount_decimal: String(unitAmount),
      recurring: interval
        ? {
            interval,
            interval_count: int(params.recurring.interval_count) ?? 1,
            usage_type: 'licensed',
            meter: null,
            trial_period_days: null,
          }
        : null,
      type: interval ? 'recurring' : 'one_time',
      lookup_key: params.lookup_key ?? null,
      nickname: params.nickname ?? null,
      product: productId,
      metadata: params.metadata ?? {},
      tax_behavior: 'unspecified',
      created: now(),
      livemode: false,
    };
    state.prices[price.id] = price;
    ctx.emit('price.created', price);
    return price;
  }

  function getPrice(id, param = 'price') {
    const price = state.prices[id];
    if (!price) throw missing('price', id, param);
    return price;
  }

  function listPrices(query) {
    let prices = Object.values(state.prices);
    const keys = query.lookup_keys;
    if (keys) prices = prices.filter((p) => [].concat(keys).includes(p.lookup_key));
    if (query.active !== undefined) prices = prices.filter((p) => String(p.active) === String(query.active));
    if (query.product) prices = prices.filter((p) => p.product === query.product);
    return prices;
  }

  return {
    createCardPaymentMethod,
    paymentMethodFromToken,
    createCustomer,
    updateCustomer,
    getCustomer,
    createProduct,
    createPrice,
    getPrice,
    listPrices,
  };
}

/** Metadata updates merge; an empty string value removes the key (the provider's rule). */
export function mergeMetadata(current, update) {
  const next = { ...current };
  for (const [key, value] of Object.entries(update ?? {})) {
    if (value === '') delete next[key];
    else next[key] = value;
  }
  return next;
}
