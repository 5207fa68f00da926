// A small stateful local fake of the payment provider's REST API: the subset Airtally uses, spoken
// the provider's way (form-encoded bracketed bodies, its object and error shapes, Idempotency-Key),
// a hosted checkout page with test cards, and signed webhook events delivered with retries.
//
// Run: node scripts/payments-fake/server.mjs   (configuration from the environment)
//   PAYMENTS_FAKE_PORT           port on 127.0.0.1 (default 54327)
//   PAYMENTS_FAKE_API_KEY        the secret key clients must send (default: any key starting sk_test_)
//   PAYMENTS_FAKE_WEBHOOK_URL    where events are POSTed (none: events are only stored)
//   PAYMENTS_FAKE_WEBHOOK_SECRET the signing secret (whsec_…; required)
//   PAYMENTS_FAKE_STATE_FILE     JSON file the state is kept in across restarts (default: memory only)
//   PAYMENTS_FAKE_RETRY_BASE_MS  first retry delay; doubles each attempt (default 1000)
//   PAYMENTS_FAKE_MAX_ATTEMPTS   delivery attempts per event before giving up (default 8)
// Test helpers (not part of the provider's API) live under /_fake/: see ADMIN_ROUTES below.
import http from 'node:http';
import { createHash } from 'node:crypto';
import { ApiError, missing } from './errors.mjs';
import { parseForm, int } from './form.mjs';
import { createStore, newId } from './store.mjs';
import { createCatalog } from './catalog.mjs';
import { createSubscriptions } from './subscriptions.mjs';
import { createCheckout, renderCheckoutPage, renderInvoicePage, checkoutErrorMessage } from './checkout.mjs';
import { createWebhooks, publicCopy } from './webhooks.mjs';

const API_VERSION = '2026-10-28.endive';

/** Starts the fake and resolves with { server, port, close } once it listens. */
export async function startPaymentsFake(options = {}) {
  const port = Number(options.port ?? process.env.PAYMENTS_FAKE_PORT ?? 54327);
  const apiKey = options.apiKey ?? process.env.PAYMENTS_FAKE_API_KEY ?? null;
  // No default: a signing secret written here would be one anybody could read (launch.mjs generates one).
  const webhookSecret = options.webhookSecret ?? process.env.PAYMENTS_FAKE_WEBHOOK_SECRET;
  if (!webhookSecret)
    throw new Error('Set PAYMENTS_FAKE_WEBHOOK_SECRET (the secret the fake signs webhook events with).');
  let publicUrl = options.publicUrl ?? process.env.PAYMENTS_FAKE_PUBLIC_URL ?? `http://127.0.0.1:${port}`;
  const log = options.log ?? ((line) => console.log(`[payments-fake] ${line}`));
  const { state, save, flush } = createStore(options.stateFile ?? process.env.PAYMENTS_FAKE_STATE_FILE ?? null);
  const webhooks = createWebhooks({
    state,
    save,
    endpoint: {
      url: options.webhookUrl ?? process.env.PAYMENTS_FAKE_WEBHOOK_URL ?? null,
      secret: webhookSecret,
    },
    apiVersion: API_VERSION,
    retryBaseMs: Number(options.retryBaseMs ?? process.env.PAYMENTS_FAKE_RETRY_BASE_MS ?? 1000),
    maxAttempts: Number(options.maxAttempts ?? process.env.PAYMENTS_FAKE_MAX_ATTEMPTS ?? 8),
    log,
  });
  const ctx = { state, publicUrl, emit: webhooks.emit };
  const catalog = createCatalog(ctx);
  const subs = createSubscriptions(ctx, catalog);
  const checkout = createCheckout(ctx, catalog, subs);

  const view = {
    subscription: (s) => publicCopy(subs.viewSubscription(s)),
    other: (o) => publicCopy(o),
  };
  const out = (object) => (object?.object === 'subscription' ? view.subscription(object) : view.other(object));

  /** Finds any stored object by its id prefix, for `expand[]`. */
  function byId(id) {
    if (typeof id !== 'string') return null;
    const table = [
      ['cus_', 'customers'],
      ['sub_', 'subscriptions'],
      ['in_', 'invoices'],
      ['price_', 'prices'],
      ['prod_', 'products'],
      ['pm_', 'payment_methods'],
      ['cs_', 'checkout_sessions'],
    ];
    const hit = table.find(([prefix]) => id.startsWith(prefix));
    const object = hit ? state[hit[1]][id] : null;
    return object ? out(object) : null;
  }

  function expand(object, paths = []) {
    for (const path of [].concat(paths)) {
      const walk = (node, parts) => {
        if (!node || typeof node !== 'object') return;
        const [head, ...rest] = parts;
        if (Array.isArray(node[head]) && rest.length) {
          for (const n of node[head]) walk(n, rest);
          return;
        }
        if (rest.length === 0) {
          const full = byId(node[head]);
          if (full) node[head] = full;
          return;
        }
        walk(node[head], rest);
      };
      walk(object, path.split('.'));
    }
    return object;
  }

  function list(url, items, query) {
    const limit = Math.min(100, Math.max(1, int(query.limit) ?? 10));
    let start = 0;
    if (query.starting_after) start = items.findIndex((i) => i.id === query.starting_after) + 1;
    const page = items.slice(start, start + limit);
    return { object: 'list', data: page.map(out), has_more: start + limit < items.length, url };
  }

  /** The provider API: [method, pattern, handler(params, body, query)]. */
  const API_ROUTES = [
    ['POST', /^\/v1\/customers$/, (_, body) => catalog.createCustomer(body)],
    ['GET', /^\/v1\/customers\/([^/]+)$/, ([id]) => catalog.getCustomer(id)],
    ['POST', /^\/v1\/customers\/([^/]+)$/, ([id], body) => catalog.updateCustomer(id, body)],
    [
      'GET',
      /^\/v1\/customers$/,
      (_, __, q) =>
        list(
          '/v1/customers',
          Object.values(state.customers)
            .filter((c) => !q.email || c.email === q.email)
            .reverse(),
          q,
        ),
    ],
    ['POST', /^\/v1\/products$/, (_, body) => catalog.createProduct(body)],
    [
      'GET',
      /^\/v1\/products\/([^/]+)$/,
      ([id]) =>
        state.products[id] ??
        (() => {
          throw missing('product', id);
        })(),
    ],
    ['POST', /^\/v1\/prices$/, (_, body) => catalog.createPrice(body)],
    ['GET', /^\/v1\/prices$/, (_, __, q) => list('/v1/prices', catalog.listPrices(q), q)],
    ['GET', /^\/v1\/prices\/([^/]+)$/, ([id]) => catalog.getPrice(id, 'id')],
    ['POST', /^\/v1\/checkout\/sessions$/, (_, body) => checkout.createSession(body)],
    ['GET', /^\/v1\/checkout\/sessions\/([^/]+)$/, ([id]) => checkout.getSession(id)],
    ['POST', /^\/v1\/checkout\/sessions\/([^/]+)\/expire$/, ([id]) => checkout.expireSession(id)],
    ['POST', /^\/v1\/subscriptions$/, (_, body) => subs.createSubscription(body)],
    ['GET', /^\/v1\/subscriptions$/, (_, __, q) => list('/v1/subscriptions', subs.listSubscriptions(q), q)],
    ['GET', /^\/v1\/subscriptions\/([^/]+)$/, ([id]) => subs.getSubscription(id)],
    ['POST', /^\/v1\/subscriptions\/([^/]+)$/, ([id], body) => subs.updateSubscription(id, body)],
    ['DELETE', /^\/v1\/subscriptions\/([^/]+)$/, ([id]) => subs.cancelSubscription(id)],
    ['GET', /^\/v1\/invoices$/, (_, __, q) => list('/v1/invoices', subs.listInvoices(q), q)],
    ['POST', /^\/v1\/invoices\/create_preview$/, (_, body) => subs.previewInvoice(body)],
    ['GET', /^\/v1\/invoices\/([^/]+)$/, ([id]) => subs.getInvoice(id)],
    ['POST', /^\/v1\/invoices\/([^/]+)\/pay$/, ([id], body) => subs.payInvoice(id, body.payment_method)],
    [
      'GET',
      /^\/v1\/events\/([^/]+)$/,
      ([id]) =>
        state.events[id] ??
        (() => {
          throw missing('event', id);
        })(),
    ],
    [
      'GET',
      /^\/v1\/events$/,
      (_, __, q) =>
        list(
          '/v1/events',
          Object.values(state.events)
            .filter((e) => !q.type || e.type === q.type)
            .reverse(),
          q,
        ),
    ],
  ];

  /** Test helpers: simulate time passing for one subscription, hold/reorder/replay deliveries. */
  const ADMIN_ROUTES = [
    // Ends the current period (or retries the open renewal invoice); body outcome=succeed|fail.
    ['POST', /^\/_fake\/subscriptions\/([^/]+)\/renew$/, ([id], body) => subs.renew(id, body.outcome)],
    // Moves the current period back so it began `days` days ago; body days=<n>.
    ['POST', /^\/_fake\/subscriptions\/([^/]+)\/backdate$/, ([id], body) => subs.backdate(id, body.days)],
    [
      'GET',
      /^\/_fake\/deliveries$/,
      (_, __, q) => ({ deliveries: webhooks.deliveries.filter((d) => !q.event || d.event === q.event) }),
    ],
    [
      'POST',
      /^\/_fake\/webhooks\/hold$/,
      () => {
        webhooks.hold();
        return { held: true };
      },
    ],
    ['POST', /^\/_fake\/webhooks\/release$/, (_, body) => ({ released: webhooks.release(body.order) })],
    [
      'POST',
      /^\/_fake\/events\/([^/]+)\/redeliver$/,
      async ([id]) => {
        const event = state.events[id];
        if (!event) throw missing('event', id);
        await webhooks.redeliver(event);
        return { redelivered: id };
      },
    ],
  ];

  function authorised(req) {
    const header = req.headers.authorization ?? '';
    let key = null;
    if (header.startsWith('Bearer ')) key = header.slice(7).trim();
    else if (header.startsWith('Basic ')) key = Buffer.from(header.slice(6), 'base64').toString().split(':')[0];
    if (!key) return false;
    return apiKey ? key === apiKey : key.startsWith('sk_test_');
  }

  function send(res, status, body, headers = {}) {
    res.writeHead(status, {
      'content-type': 'application/json',
      'stripe-version': API_VERSION,
      'request-id': headers['request-id'] ?? newId('req'),
      ...headers,
    });
    res.end(JSON.stringify(body));
  }

  async function readBody(req) {
    const chunks = [];
    for await (const chunk of req) chunks.push(chunk);
    return Buffer.concat(chunks).toString('utf8');
  }

  async function handleApi(req, res, url, raw) {
    const requestId = newId('req');
    if (!authorised(req)) {
      return send(
        res,
        401,
        {
          error: {
            type: 'invalid_request_error',
            message: 'Invalid API Key provided. Pass your test secret key as a Bearer token.',
          },
        },
        { 'request-id': requestId },
      );
    }
    const query = parseForm(url.search.slice(1));
    const contentType = req.headers['content-type'] ?? '';
    const body = contentType.includes('json') ? JSON.parse(raw || '{}') : parseForm(raw);
    const idempotencyKey = req.method === 'POST' ? req.headers['idempotency-key'] : undefined;
    const fingerprint = createHash('sha256').update(`${req.method} ${url.pathname} ${raw}`).digest('hex');
    if (idempotencyKey) {
      const previous = state.idempotency[idempotencyKey];
      if (previous && previous.fingerprint !== fingerprint) {
        return send(
          res,
          400,
          {
            error: {
              type: 'idempotency_error',
              message: `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${idempotencyKey}' if you meant to execute a different request.`,
            },
          },
          { 'request-id': requestId },
        );
      }
      if (previous)
        return send(res, previous.status, previous.body, {
          'idempotent-replayed': 'true',
          'original-request': previous.requestId,
          'request-id': requestId,
        });
    }
    const routes = url.pathname.startsWith('/_fake/') ? ADMIN_ROUTES : API_ROUTES;
    const match = routes
      .map(([method, pattern, handler]) => [method, pattern.exec(url.pathname), handler])
      .find(([method, m]) => m && method === req.method);
    let status = 200;
    let result;
    try {
      if (!match)
        throw new ApiError(404, {
          type: 'invalid_request_error',
          message: `Unrecognized request URL (${req.method}: ${url.pathname}). This payments fake supports only the endpoints Airtally uses.`,
        });
      const object = await webhooks.withRequest({ id: requestId, idempotency_key: idempotencyKey ?? null }, () =>
        match[2](match[1].slice(1), body, query),
      );
      result = expand(out(await object), [].concat(body.expand ?? [], query.expand ?? []));
    } catch (error) {
      if (!(error instanceof ApiError)) {
        log(`internal error on ${req.method} ${url.pathname}: ${error instanceof Error ? error.stack : error}`);
        return send(
          res,
          500,
          { error: { type: 'api_error', message: 'The payments fake failed; see its log.' } },
          { 'request-id': requestId },
        );
      }
      status = error.status;
      result = { error: { ...error.body, request_log_url: null } };
    }
    if (idempotencyKey) state.idempotency[idempotencyKey] = { fingerprint, status, body: result, requestId };
    save();
    return send(res, status, result, {
      'request-id': requestId,
      ...(idempotencyKey ? { 'idempotency-key': idempotencyKey } : {}),
    });
  }

  function html(res, status, page, headers = {}) {
    res.writeHead(status, { 'content-type': 'text/html; charset=utf-8', ...headers });
    res.end(page);
  }

  async function handlePage(req, res, url, raw) {
    const checkoutMatch = /^\/checkout\/([^/]+)$/.exec(url.pathname);
    const invoiceMatch = /^\/invoices\/([^/]+)$/.exec(url.pathname);
    if (checkoutMatch) {
      const session = state.checkout_sessions[checkoutMatch[1]];
      if (!session)
        return html(res, 404, '<!doctype html><title>Not found</title><p>This checkout session does not exist.</p>');
      if (req.method === 'GET') return html(res, 200, renderCheckoutPage(session, catalog, state));
      if (req.method === 'POST') {
        const form = Object.fromEntries(new URLSearchParams(raw));
        try {
          const next = checkout.completeSession(session.id, form);
          save();
          res.writeHead(303, { location: next });
          return res.end();
        } catch (error) {
          if (!(error instanceof ApiError)) throw error;
          session._lastError = checkoutErrorMessage(error);
          save();
          return html(res, 402, renderCheckoutPage(session, catalog, state, session._lastError));
        }
      }
    }
    const invoice = invoiceMatch ? state.invoices[invoiceMatch[1]] : null;
    if (invoice && req.method === 'GET') return html(res, 200, renderInvoicePage(invoice));
    if (invoice && req.method === 'POST') {
      // The hosted invoice page's card form: pay an overdue invoice with a (new) card.
      const form = Object.fromEntries(new URLSearchParams(raw));
      try {
        const pm = catalog.createCardPaymentMethod(form.cardNumber, { customer: invoice.customer });
        subs.payInvoice(invoice.id, pm.id);
        save();
        return html(res, 200, renderInvoicePage(invoice));
      } catch (error) {
        if (!(error instanceof ApiError)) throw error;
        save();
        return html(res, 402, renderInvoicePage(invoice, checkoutErrorMessage(error)));
      }
    }
    return html(res, 404, '<!doctype html><title>Not found</title><p>Not found.</p>');
  }

  const server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? '/', publicUrl);
    try {
      const raw = await readBody(req);
      if (url.pathname === '/health') return send(res, 200, { ok: true });
      if (url.pathname.startsWith('/v1/') || url.pathname.startsWith('/_fake/'))
        return await handleApi(req, res, url, raw);
      return await handlePage(req, res, url, raw);
    } catch (error) {
      log(`internal error: ${error instanceof Error ? error.stack : error}`);
      if (!res.headersSent)
        send(res, 500, {
          error: {
            type: 'api_error',
            message:
              error instanceof SyntaxError
                ? 'The request body is not valid.'
                : 'The payments fake failed; see its log.',
          },
        });
    }
  });
  await new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', resolve);
  });
  const actualPort = server.address().port;
  if (port === 0 && !options.publicUrl) {
    publicUrl = `http://127.0.0.1:${actualPort}`;
    ctx.publicUrl = publicUrl;
  }
  return {
    server,
    port: actualPort,
    webhooks,
    state,
    close: () =>
      new Promise((resolve) => {
        flush();
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

// Run directly: start from the environment and stop cleanly on SIGTERM/SIGINT.
if (import.meta.url === `file://${process.argv[1]}`) {
  const fake = await startPaymentsFake();
  console.log(`[payments-fake] listening on http://127.0.0.1:${fake.port}`);
  const stop = () => fake.close().then(() => process.exit(0));
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
}
