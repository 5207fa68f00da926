// Seeds the demo trust and its demo accounts into DATABASE_URL once; a second run changes nothing.
import { getDb, getPool } from '../../src/lib/server/db/client';
import { seedDemoAccounts } from '../seed/demo-accounts';
import { seedDemoAssessment } from '../seed/demo-assessment';
import { seedDemoBilling } from '../seed/demo-billing';
import { seedDemoEstate } from '../seed/demo-estate';

// The process's handles on DATABASE_URL (read by the configuration module), passed down to every step.
const db = getDb();
try {
  const created = await seedDemoEstate(db);
  console.log(created ? 'Demo trust seeded.' : 'Demo trust already present; nothing to seed.');
  const accounts = await seedDemoAccounts(db);
  console.log(accounts ? `Demo accounts created: ${accounts}.` : 'Demo accounts already present.');
  console.log(`Demo subscription: ${await seedDemoBilling(db)}.`);
  // `npm start` asks for a first assessment so the demo opens on results; tests start from none.
  if (process.env.AIRTALLY_SEED_ASSESSMENT === '1')
    console.log(`Demo assessment: ${await seedDemoAssessment(db, getPool())}.`);
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
