import { all, type MatrixEntry } from './types';

const adminOnly = (admin: number, otherTrust: number) => ({
  anonymous: 401,
  viewer: 403,
  finance_lead: 403,
  estates_manager: 403,
  school_limited: 403,
  trust_admin: admin,
  other_trust: otherTrust,
});

/** Billing: trust admins only; bodies are invalid or idempotent so the demo subscription never changes. */
export const entries: MatrixEntry[] = [
  {
    file: 'billing/index.ts',
    method: 'GET',
    path: '/api/billing',
    expect: adminOnly(200, 200),
    note: 'the other trust sees its own free plan',
  },
  { file: 'billing/invoices.ts', method: 'GET', path: '/api/billing/invoices', expect: adminOnly(200, 200) },
  {
    file: 'billing/checkout.ts',
    method: 'POST',
    path: '/api/billing/checkout',
    body: { interval: 'weekly' },
    expect: adminOnly(400, 403),
    note: 'the other trust admin has not confirmed their e-mail (403 email_unverified) before the body is read',
  },
  {
    file: 'billing/period.ts',
    method: 'POST',
    path: '/api/billing/period',
    body: { interval: 'weekly' },
    expect: adminOnly(400, 400),
  },
  {
    file: 'billing/cancel.ts',
    method: 'POST',
    path: '/api/billing/cancel',
    body: { atPeriodEnd: false },
    expect: adminOnly(400, 400),
    note: 'cancelling needs an explicit atPeriodEnd: true',
  },
  {
    file: 'billing/resume.ts',
    method: 'POST',
    path: '/api/billing/resume',
    expect: adminOnly(200, 409),
    note: 'resuming a subscription that is not cancelling changes nothing; the other trust has none',
  },
  {
    file: 'billing/quantity.ts',
    method: 'POST',
    path: '/api/billing/quantity',
    expect: adminOnly(200, 200),
    note: 'idempotent: the demo subscription already covers its schools; the other trust has no subscription',
  },
  {
    file: 'billing/webhook.ts',
    method: 'POST',
    path: '/api/billing/webhook',
    body: { id: 'evt_unsigned' },
    expect: all(400),
    note: 'no session: only a valid provider signature is accepted',
  },
  {
    file: 'schools/index.ts',
    method: 'POST',
    path: '/api/schools',
    body: { name: '' },
    expect: {
      anonymous: 401,
      viewer: 403,
      finance_lead: 403,
      estates_manager: 400,
      school_limited: 403,
      trust_admin: 400,
      other_trust: 400,
    },
    note: 'the body is refused after the permission check; a school-limited member may not add schools at all (see school-limited.test.ts)',
  },
];
