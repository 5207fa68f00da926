// The smaller findings of the probe (issue 17, item 6): 500s on bad input, webhooks dated in the future or
// naming another trust, formulas behind white space in exports, and local folders others could read.
import { statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import Stripe from 'stripe';
import { afterAll, describe, expect, it } from 'vitest';
import { bigTrust } from '../helpers/big-trust';
import { testDb } from '../helpers/db';
import { bodyText } from '../helpers/school-limited';
import { api, createOtherTrust } from '../helpers/session';
import { provider, subscriptionIdOf, upgrade, verifiedTrust, waitUntil } from './billing-fixture';

const db = testDb();
afterAll(() => db.destroy());

type ErrorBody = { error: { code: string; message: string } };

/** A trust of its own with one room, and that room's id. */
async function trustWithARoom() {
  const trust = await bigTrust(db, 1, 1);
  const room = await db
    .selectFrom('rooms')
    .select('id')
    .where('school_id', '=', trust.schoolIds[0]!)
    .executeTakeFirstOrThrow();
  return { ...trust, roomId: room.id };
}

describe('bad input answers 400, not 500', () => {
  it('refuses ifUnmodifiedSince that is not a date', async () => {
    const trust = await trustWithARoom();
    const response = await api(`/api/rooms/${trust.roomId}`, {
      method: 'PATCH',
      cookie: trust.cookie,
      body: JSON.stringify({ pupils: 25, ifUnmodifiedSince: 'garbage' }),
    });
    expect(response.status).toBe(400);
    expect(((await response.json()) as ErrorBody).error.message).toMatch(/ifUnmodifiedSince/);
  });

  it('refuses a NUL byte in a text field', async () => {
    const trust = await trustWithARoom();
    const response = await api(`/api/rooms/${trust.roomId}`, {
      method: 'PATCH',
      cookie: trust.cookie,
      body: JSON.stringify({ notes: 'Window\u0000sticks' }),
    });
    expect(response.status).toBe(400);
    expect(((await response.json()) as ErrorBody).error.message).toMatch(/cannot be stored/);
  });

  it('refuses a body that is not JSON with a message', async () => {
    const { cookie } = await createOtherTrust();
    const response = await api('/api/schools', { method: 'POST', cookie, body: '{"name": "unterminated' });
    expect(response.status).toBe(400);
    expect(((await response.json()) as ErrorBody).error.message).toMatch(/not valid JSON/);
  });
});

describe('payment webhooks', () => {
  const post = (payload: string, signature: string) =>
    api('/api/billing/webhook', {
      method: 'POST',
      body: payload,
      headers: { 'content-type': 'application/json', 'stripe-signature': signature },
    });
  const secret = () => process.env.STRIPE_WEBHOOK_SECRET ?? '';

  it('refuses an event signed with a timestamp in the future, and stores nothing', async () => {
    const [latest] = (await provider().events.list({ limit: 1 })).data;
    const id = `evt_future_${Date.now()}`;
    const payload = JSON.stringify({ ...latest, id });
    const future = Math.floor(Date.now() / 1000) + 3600;
    const response = await post(
      payload,
      Stripe.webhooks.generateTestHeaderString({ payload, secret: secret(), timestamp: future }),
    );
    expect(response.status).toBe(400);
    expect(((await response.json()) as ErrorBody).error.message).toMatch(/future/);
    expect(await db.selectFrom('payment_events').select('id').where('id', '=', id).executeTakeFirst()).toBeUndefined();
    // The same event signed now is accepted: it was only the date.
    expect((await post(payload, Stripe.webhooks.generateTestHeaderString({ payload, secret: secret() }))).status).toBe(
      200,
    );
  });

  it("takes the trust from the subscription's customer, never from the event's metadata", async () => {
    const payer = await verifiedTrust();
    await upgrade(payer.cookie);
    const victim = await createOtherTrust();
    const before = await db
      .selectFrom('billing_accounts')
      .selectAll()
      .where('trust_id', '=', victim.trustId)
      .executeTakeFirst();
    const subscription = await provider().subscriptions.retrieve(await subscriptionIdOf(db, payer.trustId));
    const forged = {
      id: `evt_forged_metadata_${Date.now()}`,
      object: 'event',
      type: 'customer.subscription.updated',
      created: Math.floor(Date.now() / 1000),
      livemode: false,
      api_version: '2025-01-01',
      data: { object: { ...subscription, metadata: { trust_id: victim.trustId } } },
    };
    const payload = JSON.stringify(forged);
    const response = await post(payload, Stripe.webhooks.generateTestHeaderString({ payload, secret: secret() }));
    expect(response.status).toBe(200);
    const stored = await waitUntil('the event is stored', () =>
      db.selectFrom('payment_events').select('trust_id').where('id', '=', forged.id).executeTakeFirst(),
    );
    expect(stored.trust_id).toBe(payer.trustId);
    const after = await db
      .selectFrom('billing_accounts')
      .selectAll()
      .where('trust_id', '=', victim.trustId)
      .executeTakeFirst();
    expect(after).toEqual(before);
    expect(await db.selectFrom('payment_events').select('id').where('trust_id', '=', victim.trustId).execute()).toEqual(
      [],
    );
  });
});

describe('exports', () => {
  it('keeps text that starts with white space before =, +, - or @ as text', async () => {
    const trust = await trustWithARoom();
    const notes = ' =HYPERLINK("http://evil.test","Details")';
    const patched = await api(`/api/rooms/${trust.roomId}`, {
      method: 'PATCH',
      cookie: trust.cookie,
      body: JSON.stringify({ notes, name: '\t+44 20 7946 0000' }),
    });
    expect(patched.status).toBe(200);
    const csv = await bodyText(await api('/api/exports/register.csv', { cookie: trust.cookie }));
    expect(csv).toContain(`"'${notes.replace(/"/g, '""')}"`);
    expect(csv).not.toMatch(/(^|,)"?\s*=HYPERLINK/m);
    const xlsx = await bodyText(await api('/api/exports/register.xlsx', { cookie: trust.cookie }));
    expect(xlsx).toMatch(/(?:'|&apos;) =HYPERLINK/);
    expect(xlsx).not.toMatch(/>\s*=HYPERLINK/);
  });
});

describe('local folders', () => {
  const dataDir = () => dirname(process.env.APP_PID_FILE ?? '');

  it("keeps PostgreSQL's socket folder to its owner", () => {
    expect(statSync(join(dataDir(), 'socket')).mode & 0o777).toBe(0o700);
  });

  it('keeps the mail folder (sign-in and password links) to its owner', () => {
    expect(statSync(join(dataDir(), 'mail')).mode & 0o077).toBe(0);
  });

  it('lets nobody else list the data folder', () => {
    expect(statSync(dataDir()).mode & 0o006).toBe(0);
  });
});
