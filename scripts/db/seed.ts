// Seeds the demo trust into DATABASE_URL once; a second run changes nothing.
import { createDb } from '../../src/lib/server/db/client';
import { seedDemoEstate } from '../../db/seed/seed';

const db = createDb(process.env.DATABASE_URL ?? '');
try {
  const created = await seedDemoEstate(db);
  console.log(created ? 'Demo trust seeded.' : 'Demo trust already present; nothing to seed.');
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
