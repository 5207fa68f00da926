// Where a trust stands after a failed payment: our own rule (14 days' grace, then read-only).
import { describe, expect, it } from 'vitest';
import { billingStanding } from '../../src/lib/server/billing/standing';

const failedAt = new Date('2027-03-01T09:00:00Z');
const days = (n: number) => new Date(failedAt.getTime() + n * 86_400_000);

describe('billing standing', () => {
  it('puts a trust without a paid subscription on the free plan, writable', () => {
    expect(billingStanding({ plan: 'free', status: 'none', paymentFailedAt: null })).toEqual({
      effectivePlan: 'free',
      mode: 'ok',
      graceEndsAt: null,
    });
  });

  it('falls back to the free plan when the subscription has ended', () => {
    expect(billingStanding({ plan: 'per_school', status: 'canceled', paymentFailedAt: null }).effectivePlan).toBe(
      'free',
    );
  });

  it('keeps full use for 14 days after a renewal fails, then goes read-only while still unpaid', () => {
    const snapshot = { plan: 'per_school' as const, status: 'past_due', paymentFailedAt: failedAt };
    expect(billingStanding(snapshot, days(13.9))).toMatchObject({
      effectivePlan: 'per_school',
      mode: 'grace',
      graceEndsAt: days(14),
    });
    expect(billingStanding(snapshot, days(14)).mode).toBe('read_only');
  });

  it('goes read-only at once when the provider has given up retrying (unpaid)', () => {
    expect(billingStanding({ plan: 'per_school', status: 'unpaid', paymentFailedAt: failedAt }, days(1)).mode).toBe(
      'read_only',
    );
  });
});
