// Runs every pending migration against DATABASE_URL; exits non-zero when one fails.
import { createDb } from '../../src/lib/server/db/client';
import { migrateToLatest } from '../../db/migrator';

const db = createDb(process.env.DATABASE_URL ?? '');
try {
  const applied = await migrateToLatest(db);
  console.log(applied.length ? `Applied migrations: ${applied.join(', ')}` : 'Database schema is up to date.');
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
