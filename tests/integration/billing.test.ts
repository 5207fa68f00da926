// Plans, checkout and plan limits against the running app, real Postgres and the payments fake.
import { afterAll, describe, expect, it } from 'vitest';
import { DEMO_ACCOUNTS, api, createOtherTrust, flashOf, postForm, signIn } from '../helpers/session';
import { testDb } from '../helpers/db';
import {
  addSchool,
  billingOf,
  fakeAdmin,
  payOnCheckoutPage,
  provider,
  subscriptionIdOf,
  upgrade,
  verifiedTrust,
  waitUntil,
} from './billing-fixture';

const db = testDb();
afterAll(() => db.destroy());

type ErrorBody = { error: { code: string; message: string; details: unknown } };

/** The trust's billing record as stored. */
const billingRow = (trustId: string) =>
  db.selectFrom('billing_accounts').selectAll().where('trust_id', '=', trustId).executeTakeFirstOrThrow();

describe('plans', () => {
  it('starts a new trust on the free plan with one school and a room limit', async () => {
    const { cookie } = await createOtherTrust();
    const { billing } = await billingOf(cookie);
    expect(billing).toMatchObject({ plan: 'free', status: 'none', limits: { maxSchools: 1, maxRooms: 60 } });
  });

  it('answers 402 with what to do when a second school would exceed the free plan, and adds nothing', async () => {
    const { cookie, trustId } = await createOtherTrust();
    expect((await addSchool(cookie)).status).toBe(201);
    const refused = await addSchool(cookie);
    expect(refused.status).toBe(402);
    const body = (await refused.json()) as ErrorBody;
    expect(body.error.code).toBe('payment_required');
    expect(body.error.message).toMatch(/covers 1 school/);
    expect(body.error.message).toMatch(/upgrade.*Settings → Billing/i);
    const schools = await db.selectFrom('schools').select('id').where('trust_id', '=', trustId).execute();
    expect(schools).toHaveLength(1);
  });

  it('answers 402 when a room would take the free plan past its 60 rooms', async () => {
    const { cookie, trustId } = await createOtherTrust();
    const created = (await (await addSchool(cookie)).json()) as { school: { id: string } };
    const schoolId = created.school.id;
    // Fixture: 60 rooms written straight to the database (the limit), then one more through the API.
    await db
      .insertInto('rooms')
      .values(
        Array.from({ length: 60 }, (_, i) => ({
          school_id: schoolId,
          code: `R${i + 1}`,
          floor_area_m2: 55,
          ceiling_height_m: 2.7,
          age_group: 'primary',
          ventilation_type: 'natural_single_sided',
        })),
      )
      .execute();
    const room = {
      schoolId,
      blockId: null,
      code: 'R61',
      name: 'One too many',
      use: 'classroom',
      floorAreaM2: 55,
      ceilingHeightM: 2.7,
      pupils: 28,
      adults: 1,
      ageGroup: 'primary',
      orientationDeg: 180,
      glazingAreaM2: 8,
      openableAreaM2: 2,
      windowType: 'side_hung',
      ventilationType: 'natural_single_sided',
      mechanicalSupplyLps: null,
      notes: null,
    };
    const refused = await api('/api/rooms', { method: 'POST', cookie, body: JSON.stringify(room) });
    expect(refused.status).toBe(402);
    expect(((await refused.json()) as ErrorBody).error.message).toMatch(/up to 60 rooms; this would make 61/);
    const rooms = await db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .select('rooms.id')
      .where('schools.trust_id', '=', trustId)
      .execute();
    expect(rooms).toHaveLength(60);
  });

  it('keeps the demo trust on the paid plan, in our records and at the provider, one seat per school', async () => {
    const cookie = await signIn(DEMO_ACCOUNTS.trust_admin);
    const { billing, upcoming } = await billingOf(cookie);
    const schools = await db.selectFrom('schools').select('id').where('trust_id', '=', 'demo-trust').execute();
    expect(billing.plan).toBe('per_school');
    expect(billing.quantity).toBe(schools.length);
    const sub = await provider().subscriptions.retrieve(await subscriptionIdOf(db, 'demo-trust'));
    expect(sub.items.data[0]!.quantity).toBe(schools.length);
    // £24 per school per month, the price the plan is sold at.
    expect(upcoming?.amountDuePence).toBe(2400 * schools.length);
  });
});

describe('invoices for the finance lead', () => {
  it('shows the finance lead the trust’s invoices and the next one, with no control that changes the plan', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const finance = await signIn(DEMO_ACCOUNTS.finance_lead);
    const list = async (cookie: string) => {
      const response = await api('/api/billing/invoices', { cookie });
      expect(response.status).toBe(200);
      return ((await response.json()) as { invoices: { id: string }[] }).invoices.map((i) => i.id);
    };
    // The provider's own list for the demo subscription is the oracle, not our answer to the admin.
    const atProvider = await provider().invoices.list({ subscription: await subscriptionIdOf(db, 'demo-trust') });
    expect(atProvider.data.length).toBeGreaterThan(0);
    const financeIds = await list(finance);
    expect(new Set(financeIds)).toEqual(new Set(atProvider.data.map((i) => i.id)));
    expect(financeIds).toEqual(await list(admin));

    const page = await api('/app/settings/billing', { cookie: finance });
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain('data-testid="invoices"');
    expect(html).toContain('data-testid="next-invoice"');
    expect(html).not.toMatch(/action="\/api\/billing\/(quantity|period|cancel|resume|checkout)"/);
    // Changing the plan stays with the trust admin.
    expect((await api('/api/billing/cancel', { method: 'POST', cookie: finance, body: '{}' })).status).toBe(403);
  });
});

describe('upgrade through hosted checkout', () => {
  it('refuses checkout until the trust admin has confirmed their e-mail', async () => {
    const { cookie } = await createOtherTrust();
    const response = await api('/api/billing/checkout', { method: 'POST', cookie, body: '{}' });
    expect(response.status).toBe(403);
    expect(((await response.json()) as ErrorBody).error.code).toBe('email_unverified');
  });

  it('leaves the trust on the free plan when the card is declined; only the later payment counts', async () => {
    const { cookie, trustId } = await verifiedTrust();
    const { url } = (await (await api('/api/billing/checkout', { method: 'POST', cookie, body: '{}' })).json()) as {
      url: string;
    };
    const declined = await payOnCheckoutPage(url, '4000 0000 0000 0002');
    expect(declined.status).toBe(402);
    expect(await declined.text()).toContain('Your card was declined.');
    expect((await billingOf(cookie)).billing.plan).toBe('free');
    // No fixed wait for "nothing came": the provider delivers a session's events in order, so once the later
    // payment with the test card has been delivered, anything the declined attempt caused would have been too.
    expect((await payOnCheckoutPage(url, '4242 4242 4242 4242')).status).toBe(303);
    // The plan can change on the subscription's own event before the session's completion is stored, so wait
    // for the completion itself: the one event a declined attempt must never produce.
    const completions = async () =>
      (await db.selectFrom('payment_events').select('type').where('trust_id', '=', trustId).execute()).filter(
        (e) => e.type === 'checkout.session.completed',
      );
    await waitUntil('the checkout completion reaches us', async () => (await completions()).length > 0);
    await waitUntil('the webhook puts the trust on the paid plan', async () => {
      return (await billingOf(cookie)).billing.plan === 'per_school';
    });
    expect(await completions()).toHaveLength(1);
  });

  it('activates the paid plan with a 30-day trial once the provider confirms, and audits the change', async () => {
    const { cookie, trustId } = await verifiedTrust();
    const before = Date.now();
    const { billing } = await upgrade(cookie);
    expect(billing).toMatchObject({
      plan: 'per_school',
      status: 'trialing',
      interval: 'month',
      quantity: 1,
      mode: 'ok',
    });
    const trialDays = (new Date(billing.trialEnd!).getTime() - before) / 86_400_000;
    expect(trialDays).toBeGreaterThan(29.9);
    expect(trialDays).toBeLessThan(30.1);
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'summary'])
      .where('trust_id', '=', trustId)
      .where('action', '=', 'billing.plan_changed')
      .execute();
    expect(
      audit.some((a) => /from Single School \(free\) to Whole Estate monthly, 1 school, trialing/.test(a.summary)),
    ).toBe(true);
    // Once paid, the free plan's one-school limit no longer applies.
    expect((await addSchool(cookie)).status).toBe(201);
    expect((await addSchool(cookie)).status).toBe(201);
  });

  it('closes the earlier checkout page when checkout starts again, so only one can be paid', async () => {
    const { cookie, trustId } = await verifiedTrust();
    const start = async () =>
      ((await (await api('/api/billing/checkout', { method: 'POST', cookie, body: '{}' })).json()) as { url: string })
        .url;
    const first = await start();
    const second = await start();
    const stale = await payOnCheckoutPage(first, '4242 4242 4242 4242');
    expect(stale.status).toBe(402);
    expect(await stale.text()).toContain('This checkout session is expired');
    expect((await payOnCheckoutPage(second, '4242 4242 4242 4242')).status).toBe(303);
    await waitUntil(
      'the webhook puts the trust on the paid plan',
      async () => (await billingOf(cookie)).billing.plan === 'per_school',
    );
    // The subscription's own events may come before the checkout's; the completed checkout closes the open page record.
    const account = await waitUntil('the completed checkout is recorded', async () => {
      const row = await db
        .selectFrom('billing_accounts')
        .select(['provider_customer_id', 'open_checkout_session_id'])
        .where('trust_id', '=', trustId)
        .executeTakeFirstOrThrow();
      return row.open_checkout_session_id === null ? row : undefined;
    });
    expect(
      (await provider().subscriptions.list({ customer: account.provider_customer_id!, status: 'all' })).data,
    ).toHaveLength(1);
  });

  it('cancels a second subscription paid through another checkout page, and keeps the first', async () => {
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    const kept = await subscriptionIdOf(db, trustId);
    // A checkout page opened before the first payment was confirmed (our API now refuses to open one, so it is made at the provider).
    const stripe = provider();
    const held = await stripe.subscriptions.retrieve(kept);
    const session = await stripe.checkout.sessions.create({
      mode: 'subscription',
      customer: held.customer as string,
      client_reference_id: trustId,
      line_items: [{ price: held.items.data[0]!.price.id, quantity: 1 }],
      subscription_data: { metadata: { trust_id: trustId } },
      metadata: { trust_id: trustId },
      success_url: 'http://127.0.0.1/ok',
      cancel_url: 'http://127.0.0.1/cancelled',
    });
    expect((await payOnCheckoutPage(session.url!, '4242 4242 4242 4242')).status).toBe(303);
    const audit = await waitUntil('the second subscription is cancelled', () =>
      db
        .selectFrom('audit_events')
        .select(['entity_id', 'summary'])
        .where('trust_id', '=', trustId)
        .where('action', '=', 'billing.duplicate_cancelled')
        .executeTakeFirst(),
    );
    expect(audit.entity_id).not.toBe(kept);
    expect((await stripe.subscriptions.retrieve(audit.entity_id!)).status).toBe('canceled');
    expect((await stripe.subscriptions.retrieve(kept)).status).toBe('trialing');
    expect(await subscriptionIdOf(db, trustId)).toBe(kept);
    expect((await billingOf(cookie)).billing).toMatchObject({ plan: 'per_school', status: 'trialing' });
  });

  it('refuses a second checkout while the trust is already on the paid plan', async () => {
    const cookie = await signIn(DEMO_ACCOUNTS.trust_admin);
    const response = await api('/api/billing/checkout', { method: 'POST', cookie, body: '{}' });
    expect(response.status).toBe(409);
  });
});

describe('subscription quantity follows the schools', () => {
  it('raises the quantity when a school is added, prorated for the rest of the period', async () => {
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    const stripe = provider();
    const subscriptionId = await subscriptionIdOf(db, trustId);
    // End the trial so the subscription is charged and prorations apply.
    await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/renew`, { outcome: 'succeed' });
    await waitUntil('the trial ends', async () => (await billingOf(cookie)).billing.status === 'active');

    expect((await addSchool(cookie)).status).toBe(201);
    expect((await addSchool(cookie)).status).toBe(201);
    const sub = await stripe.subscriptions.retrieve(subscriptionId);
    expect(sub.items.data[0]!.quantity).toBe(2);
    const { billing } = await billingOf(cookie);
    expect([billing.schoolCount, billing.quantity]).toEqual([2, 2]);

    const preview = await stripe.invoices.createPreview({ subscription: subscriptionId });
    const proration = preview.lines.data
      .filter((l) => l.parent?.subscription_item_details?.proration)
      .reduce((sum, l) => sum + l.amount, 0);
    // One school added at the very start of a monthly period costs (almost) one month: £24.
    expect(proration).toBeGreaterThan(2380);
    expect(proration).toBeLessThanOrEqual(2400);
    const audit = await db
      .selectFrom('audit_events')
      .select('summary')
      .where('trust_id', '=', trustId)
      .where('action', '=', 'billing.plan_changed')
      .execute();
    expect(
      audit.some((a) => /to Whole Estate monthly, 2 schools, active \(school count is now 2\)/.test(a.summary)),
    ).toBe(true);
  });
});

describe('managing the subscription', () => {
  it('switches to yearly, cancels at period end and resumes, each read back from the provider', async () => {
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    const stripe = provider();
    const subscriptionId = await subscriptionIdOf(db, trustId);

    const yearly = await api('/api/billing/period', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ interval: 'year' }),
    });
    expect(yearly.status).toBe(200);
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.price.recurring?.interval).toBe('year');
    expect((await billingOf(cookie)).billing.interval).toBe('year');

    const notConfirmed = await api('/api/billing/cancel', { method: 'POST', cookie, body: '{}' });
    expect(notConfirmed.status).toBe(400);
    const cancel = await api('/api/billing/cancel', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ atPeriodEnd: true }),
    });
    expect(cancel.status).toBe(200);
    expect((await stripe.subscriptions.retrieve(subscriptionId)).cancel_at_period_end).toBe(true);
    const cancelling = await billingOf(cookie);
    expect([cancelling.billing.cancelAtPeriodEnd, cancelling.billing.plan, cancelling.upcoming]).toEqual([
      true,
      'per_school',
      null,
    ]);

    const resume = await api('/api/billing/resume', { method: 'POST', cookie });
    expect(resume.status).toBe(200);
    expect((await stripe.subscriptions.retrieve(subscriptionId)).cancel_at_period_end).toBe(false);

    const invoices = (await (await api('/api/billing/invoices', { cookie })).json()) as {
      invoices: { status: string }[];
    };
    expect(invoices.invoices.length).toBeGreaterThan(0);
    const actions = await db
      .selectFrom('audit_events')
      .select('summary')
      .where('trust_id', '=', trustId)
      .where('action', '=', 'billing.plan_changed')
      .execute();
    expect(actions.map((a) => a.summary).join('\n')).toMatch(
      /yearly[\s\S]*cancels at period end[\s\S]*resumed by a trust admin/,
    );
  });
});

describe('the end of a cancelled subscription', () => {
  it('returns the trust to the free plan when the period ends, keeping every school', async () => {
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    for (let i = 0; i < 3; i += 1) expect((await addSchool(cookie)).status).toBe(201);
    expect(
      (await api('/api/billing/cancel', { method: 'POST', cookie, body: JSON.stringify({ atPeriodEnd: true }) }))
        .status,
    ).toBe(200);
    await fakeAdmin(`/_fake/subscriptions/${await subscriptionIdOf(db, trustId)}/renew`);
    const { billing } = await waitUntil('the provider ends the subscription', async () => {
      const body = await billingOf(cookie);
      return body.billing.plan === 'free' ? body : undefined;
    });
    expect([billing.status, billing.schoolCount]).toEqual(['canceled', 3]);
    expect((await api('/api/schools', { cookie })).status).toBe(200);
    // Beyond the free plan's limit: nothing is deleted, but no more schools can be added.
    expect((await addSchool(cookie)).status).toBe(402);
  });
});

describe('only trust admins manage billing', () => {
  const writes: [string, string, string | undefined][] = [
    ['POST', '/api/billing/checkout', '{}'],
    ['POST', '/api/billing/period', JSON.stringify({ interval: 'year' })],
    ['POST', '/api/billing/cancel', JSON.stringify({ atPeriodEnd: true })],
    ['POST', '/api/billing/resume', undefined],
    ['GET', '/api/billing', undefined],
    ['GET', '/api/billing/invoices', undefined],
  ];
  for (const role of ['viewer', 'finance_lead', 'estates_manager'] as const) {
    it(`answers 403 to the ${role.replace('_', ' ')} on every billing change and changes nothing`, async () => {
      const cookie = await signIn(DEMO_ACCOUNTS[role]);
      const before = await db
        .selectFrom('billing_accounts')
        .selectAll()
        .where('trust_id', '=', 'demo-trust')
        .executeTakeFirstOrThrow();
      for (const [method, path, body] of writes) {
        const response = await api(path, { method, cookie, ...(body ? { body } : {}) });
        // The finance lead reads the invoices (tested above); nothing else.
        const expected = role === 'finance_lead' && path === '/api/billing/invoices' ? 200 : 403;
        expect(response.status, `${method} ${path}`).toBe(expected);
      }
      const after = await db
        .selectFrom('billing_accounts')
        .selectAll()
        .where('trust_id', '=', 'demo-trust')
        .executeTakeFirstOrThrow();
      expect(after).toEqual(before);
      const page = await api('/app/settings/billing', { cookie });
      expect(page.status).toBe(200);
      const html = await page.text();
      expect(html).toContain('Only trust admins can change it.');
      expect(html).not.toContain('Continue to payment');
      expect(html).not.toContain('Cancel at the end of the period');
    });
  }

  it('refuses a form post to the billing page itself: the page only shows, its forms post to /api/billing', async () => {
    const cookie = await signIn(DEMO_ACCOUNTS.trust_admin);
    const before = await billingRow('demo-trust');
    const response = await postForm('/app/settings/billing', { action: 'cancel' }, cookie);
    expect(response.status).toBe(405);
    expect(await billingRow('demo-trust')).toEqual(before);
  });

  it("sends a viewer's billing form back to the page with the reason, and changes nothing", async () => {
    const cookie = await signIn(DEMO_ACCOUNTS.viewer);
    const before = await billingRow('demo-trust');
    const response = await postForm(
      '/api/billing/cancel',
      { atPeriodEnd: 'true', back: '/app/settings/billing' },
      cookie,
    );
    expect(response.status).toBe(303);
    expect(response.headers.get('location')).toBe('/app/settings/billing');
    expect(flashOf(response)).toMatchObject({ kind: 'error', message: expect.stringMatching(/does not allow/) });
    expect(await billingRow('demo-trust')).toEqual(before);
  });
});

describe('showing the billing page never changes the subscription', () => {
  it('leaves a quantity that is behind the schools alone on every GET, and updates it only through the form', async () => {
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    const stripe = provider();
    const subscriptionId = await subscriptionIdOf(db, trustId);
    // Fixture: two schools written straight to the database, as when adding them could not reach the provider.
    await db
      .insertInto('schools')
      .values(
        ['North', 'South'].map((name) => ({
          trust_id: trustId,
          name: `${name} Quantity School`,
          phase: 'primary' as const,
          climate_region: 'midlands' as const,
        })),
      )
      .execute();
    // The checkout's last webhook closes its checkout page; from then on nothing but this test changes the record.
    const before = await waitUntil('the checkout is closed', async () => {
      const row = await billingRow(trustId);
      return row.open_checkout_session_id === null ? row : undefined;
    });
    expect(before.quantity).toBe(1);
    const queries = [
      '',
      '?checkout=success',
      '?checkout=success&wait=3',
      '?checkout=cancelled',
      '?action=quantity',
      '?sync=1&quantity=2',
      '?interval=year&cancel=true',
    ];
    for (const query of queries) {
      const page = await api(`/app/settings/billing${query}`, { cookie });
      expect(page.status, query).toBe(200);
      expect(await page.text(), query).toContain('data-testid="quantity-behind"');
    }
    // Late webhooks may store the same state again (updated_at); what the subscription is must not have changed.
    const { updated_at: _storedAgain, ...stateBefore } = before;
    expect(await billingRow(trustId)).toMatchObject(stateBefore);
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.quantity).toBe(1);
    const auditCount = async () =>
      (
        await db
          .selectFrom('audit_events')
          .select('id')
          .where('trust_id', '=', trustId)
          .where('summary', 'like', '%school count is now%')
          .execute()
      ).length;
    expect(await auditCount()).toBe(0);

    // The page's button posts to the API route, which updates the provider and audits, then returns to the page.
    const updated = await postForm('/api/billing/quantity', { back: '/app/settings/billing' }, cookie);
    expect(updated.status).toBe(303);
    expect(updated.headers.get('location')).toBe('/app/settings/billing');
    expect(flashOf(updated)).toEqual({ kind: 'ok', message: 'The subscription now covers 2 schools.' });
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.quantity).toBe(2);
    expect((await billingRow(trustId)).quantity).toBe(2);
    expect(await auditCount()).toBe(1);
    const page = await (await api('/app/settings/billing', { cookie })).text();
    expect(page).not.toContain('data-testid="quantity-behind"');
  });
});
