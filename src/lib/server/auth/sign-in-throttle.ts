/**
 * Failed sign-in attempts per e-mail address and client address, in this process's memory.
 * Five wrong passwords within a minute lock that pair for the rest of the minute, so the sixth
 * attempt is refused with 429 whatever the password. better-auth's own per-address rate limit
 * stays on as a wider net.
 */
const WINDOW_MS = 60_000;
const MAX_FAILURES = 5;
const failures = new Map<string, number[]>();

const keyOf = (email: string, clientIp: string) => `${clientIp}|${email.trim().toLowerCase()}`;

function recent(key: string, now: number): number[] {
  const times = (failures.get(key) ?? []).filter((t) => now - t < WINDOW_MS);
  if (times.length) failures.set(key, times);
  else failures.delete(key);
  return times;
}

/** Seconds to wait before another attempt is allowed, or 0 when one may be made now. */
export function signInRetryAfterSeconds(email: string, clientIp: string, now = Date.now()): number {
  const times = recent(keyOf(email, clientIp), now);
  if (times.length < MAX_FAILURES) return 0;
  const oldest = times[times.length - MAX_FAILURES] ?? now;
  return Math.max(1, Math.ceil((oldest + WINDOW_MS - now) / 1000));
}

/** Notes one wrong password. */
export function recordSignInFailure(email: string, clientIp: string, now = Date.now()): void {
  const key = keyOf(email, clientIp);
  failures.set(key, [...recent(key, now), now]);
}

/** Forgets the failures after a successful sign-in. */
export function clearSignInFailures(email: string, clientIp: string): void {
  failures.delete(keyOf(email, clientIp));
}
