// Events and their delivery: every change becomes an event, signed the provider's way
// (Stripe-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256 of "t.payload" with the endpoint secret>)
// and POSTed to the webhook URL; a failed delivery (network error or non-2xx) is retried with backoff.
import { createHmac } from 'node:crypto';
import { newId, now } from './store.mjs';

/** Strips the fake's internal fields (leading underscore) and deep-copies, so events are snapshots. */
export function publicCopy(value) {
  return JSON.parse(JSON.stringify(value, (key, v) => (key.startsWith('_') ? undefined : v)));
}

/** The Stripe-Signature header for `payload` signed with `secret` at `timestamp`. */
export function signatureHeader(payload, secret, timestamp = now()) {
  const signature = createHmac('sha256', secret).update(`${timestamp}.${payload}`, 'utf8').digest('hex');
  return `t=${timestamp},v1=${signature}`;
}

export function createWebhooks({ state, save, endpoint, apiVersion, retryBaseMs, maxAttempts, log }) {
  /** Every delivery attempt, newest last, for tests and debugging (GET /_fake/deliveries). */
  const deliveries = [];
  /** While held, new deliveries queue here instead of being sent (POST /_fake/webhooks/hold). */
  let held = null;
  let request = null;

  function emit(type, object, previousAttributes) {
    const event = {
      id: newId('evt'),
      object: 'event',
      api_version: apiVersion,
      created: now(),
      data: {
        object: publicCopy(object),
        ...(previousAttributes ? { previous_attributes: publicCopy(previousAttributes) } : {}),
      },
      livemode: false,
      pending_webhooks: endpoint.url ? 1 : 0,
      request: request ?? { id: null, idempotency_key: null },
      type,
    };
    state.events[event.id] = event;
    save();
    if (!endpoint.url) return event;
    if (held) held.push(event);
    else queueMicrotask(() => void deliver(event, 1));
    return event;
  }

  async function deliver(event, attempt) {
    const payload = JSON.stringify(event, null, 2);
    const record = {
      event: event.id,
      type: event.type,
      attempt,
      at: new Date().toISOString(),
      status: null,
      error: null,
    };
    deliveries.push(record);
    try {
      const response = await fetch(endpoint.url, {
        method: 'POST',
        headers: {
          'content-type': 'application/json; charset=utf-8',
          'user-agent': 'PaymentsFake/1.0 (+webhooks)',
          'stripe-signature': signatureHeader(payload, endpoint.secret),
        },
        body: payload,
        signal: AbortSignal.timeout(15_000),
      });
      record.status = response.status;
      await response.arrayBuffer().catch(() => undefined);
      if (response.ok) {
        event.pending_webhooks = 0;
        save();
        return;
      }
    } catch (error) {
      record.error = error instanceof Error ? error.message : String(error);
    }
    if (attempt >= maxAttempts) {
      log(`webhook ${event.id} (${event.type}) gave up after ${attempt} attempts`);
      return;
    }
    const delayMs = retryBaseMs * 2 ** (attempt - 1);
    setTimeout(() => void deliver(event, attempt + 1), delayMs).unref();
  }

  return {
    emit,
    deliveries,
    /** Runs `fn` with the API request's id and idempotency key stamped on the events it emits. */
    withRequest(req, fn) {
      request = req;
      try {
        return fn();
      } finally {
        request = null;
      }
    },
    hold() {
      held ??= [];
    },
    /** Sends the held events, in the order they happened or reversed. Returns their ids. */
    release(order = 'original') {
      const events = held ?? [];
      held = null;
      const list = order === 'reverse' ? [...events].reverse() : events;
      (async () => {
        for (const event of list) await deliver(event, 1);
      })();
      return list.map((e) => e.id);
    },
    /** Delivers a stored event again, unchanged (what a replay looks like to the receiver). */
    redeliver(event) {
      return deliver(event, 1);
    },
  };
}
