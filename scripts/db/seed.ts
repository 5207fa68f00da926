// Seeds the demo trust and its demo accounts into DATABASE_URL once; a second run changes nothing.
import { createDb } from '../../src/lib/server/db/client';
import { seedDemoEstate } from '../../db/seed/seed';
import { seedDemoAccounts } from '../../db/seed/demo-accounts';
import { seedDemoBilling } from '../../db/seed/demo-billing';

const db = createDb(process.env.DATABASE_URL ?? '');
try {
  const created = await seedDemoEstate(db);
  console.log(created ? 'Demo trust seeded.' : 'Demo trust already present; nothing to seed.');
  const accounts = await seedDemoAccounts(db);
  console.log(accounts ? `Demo accounts created: ${accounts}.` : 'Demo accounts already present.');
  console.log(`Demo subscription: ${await seedDemoBilling(db)}.`);
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
