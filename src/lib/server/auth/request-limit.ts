/**
 * A small per-address request budget for the account forms that call better-auth on the server
 * (sign-up, forgotten password, sign-in page), where better-auth's own HTTP rate limiter does not run.
 * In this process's memory: a single server process is how Airtally is deployed.
 */
import { config } from '../config';

const hits = new Map<string, number[]>();

/** Limits of each form, per client address; every one grows with the configured per-address budget (raised in tests). */
export function formLimits() {
  const perAddress = config().auth.signInPerMinutePerAddress;
  return {
    signUp: { max: Math.max(60, perAddress), windowMs: 60_000 },
    passwordReset: { max: Math.max(10, Math.floor(perAddress / 10)), windowMs: 60_000 },
    signIn: { max: Math.max(120, perAddress * 2), windowMs: 60_000 },
  } as const;
}

/** Counts one request; returns the seconds to wait when the budget is spent, else 0. */
export function takeRequest(form: keyof ReturnType<typeof formLimits>, clientIp: string, now = Date.now()): number {
  const { max, windowMs } = formLimits()[form];
  const key = `${form}|${clientIp}`;
  const recent = (hits.get(key) ?? []).filter((t) => now - t < windowMs);
  if (recent.length >= max) {
    hits.set(key, recent);
    return Math.max(1, Math.ceil(((recent[0] ?? now) + windowMs - now) / 1000));
  }
  recent.push(now);
  hits.set(key, recent);
  return 0;
}

/** The message shown when a form's budget is spent. */
export const tooManyRequests = (seconds: number) =>
  `Too many attempts from your network. Wait ${seconds} seconds and try again.`;
