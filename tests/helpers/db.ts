import pg from 'pg';
import { createDb } from '../../src/lib/server/db/client';

/** The test database the app under test uses (migrated and seeded by scripts/test.mjs). */
export function testDb() {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set: run the tests through `npm test`.');
  return createDb(url);
}

/** Creates an empty database beside the test database, for tests that need a blank schema. */
export async function createScratchDatabase(name: string) {
  const adminUrl = process.env.TEST_ADMIN_DATABASE_URL;
  if (!adminUrl) throw new Error('TEST_ADMIN_DATABASE_URL is not set: run the tests through `npm test`.');
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
  await admin.query(`CREATE DATABASE "${name}"`);
  await admin.end();
  const url = adminUrl.replace(/\/[^/]+$/, `/${name}`);
  const db = createDb(url);
  return {
    url,
    db,
    async drop() {
      await db.destroy();
      const client = new pg.Client({ connectionString: adminUrl });
      await client.connect();
      await client.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
      await client.end();
    },
  };
}

/**
 * Takes out of the shared demo trust the invitations and memberships a test file added since `since` (their limits
 * and chosen schools cascade), so the next file finds the demo trust's members as seeded.
 */
export async function removeDemoMembersAddedSince(db: ReturnType<typeof testDb>, since: Date): Promise<void> {
  await db
    .deleteFrom('invitation')
    .where('organizationId', '=', 'demo-trust')
    .where('createdAt', '>=', since)
    .execute();
  await db.deleteFrom('member').where('organizationId', '=', 'demo-trust').where('createdAt', '>=', since).execute();
}
