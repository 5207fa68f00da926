// Account takeover and sign-in guard probes (issue 17, items 1 and 2), against the running app.
import { readFileSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { createEmailVerificationToken } from 'better-auth/api';
import { afterAll, describe, expect, it } from 'vitest';
import { serverEnv, spawnBuiltServer } from '../helpers/built-server';
import { testDb } from '../helpers/db';
import { linkIn, waitForMail } from '../helpers/mail';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, api, createOtherTrust, signIn, uniqueEmail } from '../helpers/session';

const db = testDb();
afterAll(() => db.destroy());

/** The auth fallback once committed to this repository: published, so it must sign nothing. */
const PUBLISHED_AUTH_SECRET = 'airtally-loopback-only-development-secret-do-not-use-in-production';
const liveSecret = () => process.env.BETTER_AUTH_SECRET ?? '';

const userRow = (email: string) =>
  db.selectFrom('user').select(['id', 'email', 'emailVerified']).where('email', '=', email).executeTakeFirstOrThrow();

/** Starts the built server with `env` and resolves with its exit code and output; throws if it keeps running. */
function startBuiltServer(env: Record<string, string>): Promise<{ code: number | null; output: string }> {
  const server = spawnBuiltServer(env);
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => {
      server.child.kill('SIGKILL');
      reject(new Error(`The server started and kept running:\n${server.output()}`));
    }, 20_000);
    server.child.on('exit', (code) => {
      clearTimeout(timer);
      resolve({ code, output: server.output() });
    });
  });
}

/** The test environment without the auth secret, on a port of its own. */
const bareEnv = (extra: Record<string, string>) => serverEnv(90, extra, ['BETTER_AUTH_SECRET']);

describe('secrets', () => {
  it('keeps the generated secrets in the data folder, readable by its owner only, none of them published', () => {
    const file = join(dirname(process.env.APP_PID_FILE ?? ''), 'secrets.json');
    expect(statSync(file).mode & 0o777).toBe(0o600);
    const secrets = JSON.parse(readFileSync(file, 'utf8')) as Record<string, string>;
    expect(secrets.authSecret).toBe(liveSecret());
    expect(secrets.authSecret).toMatch(/^[0-9a-f]{64}$/);
    expect(secrets.webhookSecret).toBe(process.env.STRIPE_WEBHOOK_SECRET);
    expect(secrets.paymentsApiKey).toBe(process.env.STRIPE_SECRET_KEY);
    expect(Object.values(secrets)).not.toContain(PUBLISHED_AUTH_SECRET);
    expect(Object.values(secrets)).not.toContain('whsec_airtally_local_fake_signing_secret');
  });

  it.each([
    ['in production without BETTER_AUTH_SECRET', { NODE_ENV: 'production' }, /BETTER_AUTH_SECRET is not set/],
    ['on a non-loopback host without BETTER_AUTH_SECRET', { NODE_ENV: 'development', HOST: '0.0.0.0' }, /not set/],
    [
      'for a public origin without BETTER_AUTH_SECRET',
      { NODE_ENV: 'development', PUBLIC_ORIGIN: 'https://airtally.example-trust.test' },
      /not set/,
    ],
    ['with the published auth secret', { BETTER_AUTH_SECRET: PUBLISHED_AUTH_SECRET }, /published/],
    [
      'with the published webhook secret',
      { BETTER_AUTH_SECRET: liveSecret(), STRIPE_WEBHOOK_SECRET: 'whsec_airtally_local_fake_signing_secret' },
      /STRIPE_WEBHOOK_SECRET is a value published/,
    ],
  ])('refuses to start %s, with a message and a non-zero exit', async (_label, extra, message) => {
    const { code, output } = await startBuiltServer(bareEnv(extra));
    expect(code).not.toBe(0);
    expect(output).toMatch(message);
    expect(output).toContain('Airtally will not start');
  });
});

describe('e-mail links', () => {
  it('refuses a confirmation link signed with the published secret', async () => {
    const { email } = await createOtherTrust();
    const token = await createEmailVerificationToken(PUBLISHED_AUTH_SECRET, email, undefined, 3600);
    const page = await api(`/verify-email?token=${encodeURIComponent(token)}`);
    expect(page.status).toBe(400);
    expect((await userRow(email)).emailVerified).toBe(false);
  });

  it('never changes an address through verify-email, however the token is signed', async () => {
    const victim = await createOtherTrust();
    const before = await userRow(victim.email);
    const attacker = uniqueEmail('attacker');
    for (const secret of [liveSecret(), PUBLISHED_AUTH_SECRET]) {
      for (const requestType of [undefined, 'change-email-verification', 'change-email-confirmation']) {
        const token = await createEmailVerificationToken(secret, victim.email, attacker, 3600, {
          userId: before.id,
          ...(requestType ? { requestType } : {}),
        });
        const page = await api(`/verify-email?token=${encodeURIComponent(token)}`);
        expect(page.status).toBe(400);
        const direct = await api(`/api/auth/verify-email?token=${encodeURIComponent(token)}`);
        expect(direct.status).toBeGreaterThanOrEqual(400);
        expect(direct.status).toBeLessThan(500);
      }
    }
    expect(await userRow(victim.email)).toEqual(before);
    expect(await db.selectFrom('user').select('id').where('email', '=', attacker).executeTakeFirst()).toBeUndefined();
    // The victim's own password still works; nobody else's address took the account.
    expect(await signIn(victim.email)).toContain('session_token');
  });
});

describe('sign-in guard', () => {
  const wrong = (email: string, i: number, headers: Record<string, string> = {}) =>
    api('/api/auth/sign-in/email', {
      method: 'POST',
      headers,
      body: JSON.stringify({ email, password: `wrong-password-${i}` }),
    });

  it('locks an address after five wrong passwords however X-Forwarded-For is rotated', async () => {
    const { email } = await createOtherTrust();
    const statuses: number[] = [];
    for (let i = 0; i < 6; i += 1)
      statuses.push((await wrong(email, i, { 'x-forwarded-for': `203.0.113.${i + 1}` })).status);
    expect(statuses).toEqual([401, 401, 401, 401, 401, 429]);
  });

  it('accepts JSON only, so a form-encoded body cannot slip a locked address past the guard', async () => {
    const { email } = await createOtherTrust();
    for (let i = 0; i < 5; i += 1) expect((await wrong(email, i)).status).toBe(401);
    const form = await api('/api/auth/sign-in/email', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ email, password: DEMO_PASSWORD }).toString(),
    });
    expect(form.status).toBe(415);
    expect(form.headers.getSetCookie()).toEqual([]);
    const decoy = await api('/api/auth/sign-in/email', {
      method: 'POST',
      headers: { 'content-type': 'text/plain' },
      body: `{"email":"decoy@test.airtally.test","password":"x"}&email=${encodeURIComponent(email)}&password=${DEMO_PASSWORD}`,
    });
    expect(decoy.status).toBe(415);
    const json = await api('/api/auth/sign-in/email', {
      method: 'POST',
      body: JSON.stringify({ email: ` ${email.toUpperCase()} `, password: DEMO_PASSWORD }),
    });
    expect(json.status).toBe(429);
  });

  it('does not echo the session token in JSON answers', async () => {
    const response = await api('/api/auth/sign-in/email', {
      method: 'POST',
      body: JSON.stringify({ email: DEMO_ACCOUNTS.viewer, password: DEMO_PASSWORD }),
    });
    expect(response.status).toBe(200);
    const cookieToken = /session_token=([^.;]+)/.exec(response.headers.getSetCookie().join(';'))?.[1] ?? '';
    expect(cookieToken.length).toBeGreaterThan(10);
    const text = await response.text();
    expect(text).not.toContain(cookieToken);
    expect(JSON.parse(text)).not.toHaveProperty('token');
    const cookie = `better-auth.session_token=${/session_token=([^;]+)/.exec(response.headers.getSetCookie().join(';'))?.[1]}`;
    const session = await api('/api/auth/get-session', { cookie });
    expect(await session.text()).not.toContain(cookieToken);
  });
});

describe('no user enumeration', () => {
  const reset = (email: string) =>
    api('/api/auth/request-password-reset', {
      method: 'POST',
      body: JSON.stringify({ email, redirectTo: '/reset-password' }),
    });

  it('answers a password request alike for known and unknown addresses, and e-mails only the known one', async () => {
    const { email } = await createOtherTrust();
    const unknown = uniqueEmail('nobody');
    const [known, other] = await Promise.all([reset(email), reset(unknown)]);
    expect(known.status).toBe(200);
    expect(other.status).toBe(200);
    expect(await known.json()).toEqual(await other.json());
    linkIn(await waitForMail(email, 'new Airtally password'), '/reset-password');
  });

  it('takes the same time for known and unknown addresses (the e-mail goes out after the answer)', async () => {
    const { email } = await createOtherTrust();
    const timed = async (address: string) => {
      const start = performance.now();
      const response = await reset(address);
      await response.arrayBuffer();
      return performance.now() - start;
    };
    const known: number[] = [];
    const unknown: number[] = [];
    for (let i = 0; i < 15; i += 1) {
      known.push(await timed(email));
      unknown.push(await timed(uniqueEmail('nobody')));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? 0;
    expect(Math.abs(median(known) - median(unknown))).toBeLessThan(5);
  });
});

describe('redirect after sign-in', () => {
  it.each([['/%09/evil.test'], ['/%0d%0aLocation:%20https://evil.test'], ['/%5C%5Cevil.test'], ['//evil.test']])(
    'sends next=%s to /app, never off the site and never a 500',
    async (next) => {
      const cookie = await signIn(DEMO_ACCOUNTS.viewer);
      const response = await api(`/sign-in?next=${next}`, { cookie });
      expect(response.status).toBe(303);
      expect(response.headers.get('location')).toBe('/app');
    },
  );
});
