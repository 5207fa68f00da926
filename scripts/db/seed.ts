// Seeds the demo trust and its demo accounts into DATABASE_URL once; a second run changes nothing.
import { createDb } from '../../src/lib/server/db/client';
import { seedDemoEstate } from '../seed/demo-estate';
import { seedDemoAccounts } from '../seed/demo-accounts';
import { seedDemoBilling } from '../seed/demo-billing';
import { seedDemoAssessment } from '../seed/demo-assessment';
import { getPool } from '../../src/lib/server/db/client';

const db = createDb(process.env.DATABASE_URL ?? '');
try {
  const created = await seedDemoEstate(db);
  console.log(created ? 'Demo trust seeded.' : 'Demo trust already present; nothing to seed.');
  const accounts = await seedDemoAccounts(db);
  console.log(accounts ? `Demo accounts created: ${accounts}.` : 'Demo accounts already present.');
  console.log(`Demo subscription: ${await seedDemoBilling(db)}.`);
  // `npm start` asks for a first assessment so the demo opens on results; tests start from none.
  if (process.env.AIRTALLY_SEED_ASSESSMENT === '1') console.log(`Demo assessment: ${await seedDemoAssessment(db)}.`);
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exitCode = 1;
} finally {
  await db.destroy();
  if (process.env.AIRTALLY_SEED_ASSESSMENT === '1') await getPool().end();
}
