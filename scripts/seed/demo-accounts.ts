import { hashPassword } from 'better-auth/crypto';
import type { Kysely } from 'kysely';
import type { Database } from '../../db/database';
import { DEMO_TRUST } from './demo-trust';

/** The shared password of the demo accounts (documented in the README). */
export const DEMO_PASSWORD = 'airtally-demo-2026';

/** One demo person per role in the demo trust; every name is invented. */
export const DEMO_ACCOUNTS = [
  {
    id: 'demo-user-trust-admin',
    email: 'trust.admin@demo.airtally.test',
    name: 'Morven Ashcombe',
    role: 'trust_admin',
  },
  { id: 'demo-user-estates', email: 'estates@demo.airtally.test', name: 'Idris Pennock', role: 'estates_manager' },
  { id: 'demo-user-finance', email: 'finance@demo.airtally.test', name: 'Tamsin Halloway', role: 'finance_lead' },
  { id: 'demo-user-viewer', email: 'viewer@demo.airtally.test', name: 'Ravi Okonedo', role: 'viewer' },
] as const;

/**
 * Creates the demo accounts with verified e-mail addresses and their memberships of the demo trust.
 * Passwords are hashed with better-auth's own hasher so sign-in works. Idempotent: accounts that
 * already exist are left alone, so a second run only reads. Returns how many were created.
 */
export async function seedDemoAccounts(db: Kysely<Database>): Promise<number> {
  const existing = await db
    .selectFrom('user')
    .select('email')
    .where(
      'email',
      'in',
      DEMO_ACCOUNTS.map((a) => a.email),
    )
    .execute();
  const present = new Set(existing.map((row) => row.email));
  const missing = DEMO_ACCOUNTS.filter((account) => !present.has(account.email));
  if (missing.length === 0) return 0;
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db.transaction().execute(async (trx) => {
    for (const account of missing) {
      const now = new Date();
      await trx
        .insertInto('user')
        .values({
          id: account.id,
          name: account.name,
          email: account.email,
          emailVerified: true,
          image: null,
          createdAt: now,
          updatedAt: now,
        })
        .execute();
      await trx
        .insertInto('account')
        .values({
          id: `${account.id}-credential`,
          accountId: account.id,
          providerId: 'credential',
          userId: account.id,
          password: passwordHash,
          accessToken: null,
          refreshToken: null,
          idToken: null,
          accessTokenExpiresAt: null,
          refreshTokenExpiresAt: null,
          scope: null,
          createdAt: now,
          updatedAt: now,
        })
        .execute();
      await trx
        .insertInto('member')
        .values({
          id: `${account.id}-member`,
          organizationId: DEMO_TRUST.id,
          userId: account.id,
          role: account.role,
          createdAt: now,
        })
        .execute();
    }
    await trx
      .insertInto('audit_events')
      .values({
        trust_id: DEMO_TRUST.id,
        action: 'seed',
        entity_type: 'member',
        entity_id: null,
        summary: `Demo accounts created: ${missing.map((a) => a.email).join(', ')}`,
      })
      .execute();
  });
  return missing.length;
}
