// The fake's whole state: one object of collections, saved to a JSON file after each change so
// the demo subscription survives a restart of `npm start`.
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { randomBytes } from 'node:crypto';

const COLLECTIONS = [
  'customers',
  'products',
  'prices',
  'checkout_sessions',
  'subscriptions',
  'invoices',
  'events',
  'payment_methods',
];
const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789';

/** A provider-style id: prefix, underscore, 24 random base62 characters. */
export function newId(prefix) {
  const bytes = randomBytes(24);
  let out = '';
  for (const b of bytes) out += ALPHABET[b % ALPHABET.length];
  return `${prefix}_${out}`;
}

/** Seconds since the epoch, as the provider's timestamps are. */
export function now() {
  return Math.floor(Date.now() / 1000);
}

/** Creates the store, loading `file` when it exists (pass null to keep state in memory only). */
export function createStore(file) {
  const state = { idempotency: {} };
  for (const name of COLLECTIONS) state[name] = {};
  if (file && existsSync(file)) {
    const saved = JSON.parse(readFileSync(file, 'utf8'));
    for (const name of COLLECTIONS) state[name] = saved[name] ?? {};
    state.idempotency = saved.idempotency ?? {};
  }
  let timer = null;
  const write = () => {
    timer = null;
    mkdirSync(dirname(file), { recursive: true });
    // Customers' names and e-mails: readable by this user only.
    writeFileSync(`${file}.tmp`, JSON.stringify(state), { mode: 0o600 });
    renameSync(`${file}.tmp`, file);
  };
  /** Schedules a write (changes come in bursts; one write covers them). */
  const save = () => {
    if (!file || timer) return;
    timer = setTimeout(write, 50);
  };
  /** Writes any scheduled change now (on shutdown). */
  const flush = () => {
    if (!file || !timer) return;
    clearTimeout(timer);
    write();
  };
  return { state, save, flush };
}
