// The secrets a local run needs — the auth secret, the payments fake's API key and its webhook signing
// secret — generated at random the first time a data folder is used and kept in it (mode 0600), so
// nothing secret is ever committed and sessions survive a restart.
import { randomBytes } from 'node:crypto';
import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const random = (bytes) => randomBytes(bytes).toString('hex');

/**
 * @param {string} dataDir
 * @returns {{ authSecret: string, paymentsApiKey: string, webhookSecret: string }}
 */
export function dataFolderSecrets(dataDir) {
  const file = join(dataDir, 'secrets.json');
  mkdirSync(dataDir, { recursive: true });
  if (existsSync(file)) {
    chmodSync(file, 0o600);
    const stored = JSON.parse(readFileSync(file, 'utf8'));
    if (stored.authSecret && stored.paymentsApiKey && stored.webhookSecret) return stored;
  }
  const secrets = {
    authSecret: random(32),
    paymentsApiKey: `sk_test_${random(24)}`,
    webhookSecret: `whsec_${random(24)}`,
  };
  writeFileSync(file, `${JSON.stringify(secrets, null, 2)}\n`, { mode: 0o600 });
  chmodSync(file, 0o600);
  return secrets;
}
