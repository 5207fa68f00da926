import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../../../../db/database';
import { AppError } from '../http/errors';
import { countEstate, getBillingAccount } from './billing.repository';
import { FREE_PLAN } from './plans';
import { billingStanding } from './standing';

/** What a write is about to add to the trust's estate. */
export interface EstateAddition {
  /** Schools about to be created. */
  schools?: number;
  /** Rooms about to be created. */
  rooms?: number;
}

/**
 * Throws a 402 AppError when adding `addition` would take the trust beyond its plan: the free plan
 * allows FREE_PLAN.maxSchools school(s) and FREE_PLAN.maxRooms rooms; the per-school plan has no cap
 * (its quantity follows the school count). Call it inside the write's transaction, before inserting.
 */
export async function assertWithinPlan(
  db: Kysely<Database> | Transaction<Database>,
  trustId: string,
  addition: EstateAddition,
): Promise<void> {
  const addSchools = addition.schools ?? 0;
  const addRooms = addition.rooms ?? 0;
  if (addSchools <= 0 && addRooms <= 0) return;
  const account = await getBillingAccount(db, trustId);
  if (billingStanding(account).effectivePlan !== 'free') return;
  const current = await countEstate(db, trustId);
  const upgrade = 'A trust admin can upgrade to the Whole Estate plan (priced per school) under Settings → Billing.';
  if (current.schools + addSchools > FREE_PLAN.maxSchools) {
    throw paymentRequiredWith(
      `The free ${FREE_PLAN.name} plan covers ${FREE_PLAN.maxSchools} school; this would make ${current.schools + addSchools}. ${upgrade}`,
      { limit: 'schools', max: FREE_PLAN.maxSchools, current: current.schools, adding: addSchools },
    );
  }
  if (current.rooms + addRooms > FREE_PLAN.maxRooms) {
    throw paymentRequiredWith(
      `The free ${FREE_PLAN.name} plan covers up to ${FREE_PLAN.maxRooms} rooms; this would make ${current.rooms + addRooms}. ${upgrade}`,
      { limit: 'rooms', max: FREE_PLAN.maxRooms, current: current.rooms, adding: addRooms },
    );
  }
}

function paymentRequiredWith(message: string, details: unknown): AppError {
  return new AppError(402, 'payment_required', message, details);
}
