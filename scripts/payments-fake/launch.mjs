// Starts the payments fake as a child of `npm start` / `npm test` / `npm run bench` on loopback and
// returns the environment the app needs to reach it with the official SDK (a real deployment sets
// the same variables to the provider's values instead: see src/lib/server/billing/provider.ts).
import { join } from 'node:path';
import { rmSync } from 'node:fs';
import { ROOT, startChild, waitForPort } from '../lib/services.mjs';

/**
 * @param {{ port: number, appOrigin: string, dataDir: string, secretKey: string, webhookSecret: string, persist?: boolean, retryBaseMs?: number }} options
 *   secretKey and webhookSecret come from the data folder (scripts/lib/secrets.mjs), never from the repository
 * @returns {Promise<Record<string, string>>} STRIPE_* variables for the app and PAYMENTS_FAKE_URL for tests
 */
export async function startPaymentsFakeChild({
  port,
  appOrigin,
  dataDir,
  secretKey,
  webhookSecret,
  persist = false,
  retryBaseMs = 1000,
}) {
  const stateFile = join(dataDir, 'payments-fake.json');
  if (!persist) rmSync(stateFile, { force: true });
  startChild('payments-fake', process.execPath, [join(ROOT, 'scripts', 'payments-fake', 'server.mjs')], {
    quiet: true,
    env: {
      PAYMENTS_FAKE_PORT: String(port),
      PAYMENTS_FAKE_API_KEY: secretKey,
      PAYMENTS_FAKE_WEBHOOK_URL: `${appOrigin}/api/billing/webhook`,
      PAYMENTS_FAKE_WEBHOOK_SECRET: webhookSecret,
      PAYMENTS_FAKE_RETRY_BASE_MS: String(retryBaseMs),
      PAYMENTS_FAKE_MAX_ATTEMPTS: '10',
      ...(persist ? { PAYMENTS_FAKE_STATE_FILE: stateFile } : {}),
    },
  });
  await waitForPort(port, 20_000, 'The payments fake');
  return {
    STRIPE_SECRET_KEY: secretKey,
    STRIPE_WEBHOOK_SECRET: webhookSecret,
    STRIPE_API_HOST: '127.0.0.1',
    STRIPE_API_PORT: String(port),
    STRIPE_API_PROTOCOL: 'http',
    PAYMENTS_FAKE_URL: `http://127.0.0.1:${port}`,
  };
}
