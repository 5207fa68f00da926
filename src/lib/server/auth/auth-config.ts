import { z } from 'zod';

/** Where the app is reached and how sessions behave, declared once from the environment. */
const AuthEnvSchema = z.object({
  PUBLIC_ORIGIN: z.string().url().optional(),
  PORT: z.coerce.number().int().positive().default(4321),
  BETTER_AUTH_SECRET: z.string().min(32, 'BETTER_AUTH_SECRET must be at least 32 characters').optional(),
  /** Session lifetime in seconds (default 7 days); a session used within the last day is extended. */
  AUTH_SESSION_SECONDS: z.coerce
    .number()
    .int()
    .positive()
    .default(7 * 24 * 3600),
  /** Set to "true" only behind a reverse proxy that overwrites X-Forwarded-For. */
  AUTH_TRUST_PROXY: z.enum(['true', 'false']).default('false'),
  /**
   * Sign-in attempts per minute from one client address, whatever the account (the per-account brute-force
   * guard is separate and always on). The test run raises it: hundreds of sign-ins come from loopback there.
   */
  AUTH_SIGN_IN_PER_MINUTE_PER_ADDRESS: z.coerce.number().int().positive().default(60),
});

// Used only when BETTER_AUTH_SECRET is unset and the app is served from this machine's loopback address.
const LOOPBACK_DEVELOPMENT_SECRET = 'airtally-loopback-only-development-secret-do-not-use-in-production';

export interface AuthConfig {
  origin: string;
  secret: string;
  secureCookies: boolean;
  sessionSeconds: number;
  trustProxy: boolean;
  signInPerMinutePerAddress: number;
}

/** True for http(s)://localhost, 127.0.0.1 and [::1]. */
export function isLoopbackOrigin(origin: string): boolean {
  const host = new URL(origin).hostname;
  return host === 'localhost' || host === '127.0.0.1' || host === '[::1]';
}

let cached: AuthConfig | undefined;

/** The parsed sign-in configuration; refuses to start on a public address without BETTER_AUTH_SECRET. */
export function authConfig(): AuthConfig {
  if (cached) return cached;
  const env = AuthEnvSchema.parse(process.env);
  const origin = (env.PUBLIC_ORIGIN ?? `http://127.0.0.1:${env.PORT}`).replace(/\/$/, '');
  const loopback = isLoopbackOrigin(origin);
  if (!env.BETTER_AUTH_SECRET && !loopback) {
    throw new Error(
      'BETTER_AUTH_SECRET is not set. Set it to a random string of at least 32 characters (openssl rand -hex 32) before serving Airtally on a public address.',
    );
  }
  cached = {
    origin,
    secret: env.BETTER_AUTH_SECRET ?? LOOPBACK_DEVELOPMENT_SECRET,
    secureCookies: !loopback,
    sessionSeconds: env.AUTH_SESSION_SECONDS,
    trustProxy: env.AUTH_TRUST_PROXY === 'true',
    signInPerMinutePerAddress: env.AUTH_SIGN_IN_PER_MINUTE_PER_ADDRESS,
  };
  return cached;
}
