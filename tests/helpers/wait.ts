// The one way tests wait for something to happen: poll until a check answers a value, and throw when it does not
// come in time (a test that falls through on timeout could never fail).

/** Polls `check` until it returns a value other than undefined, null or false; throws after `timeoutMs`. */
export async function waitFor<T>(
  what: string,
  check: () => Promise<T | undefined | null | false> | T | undefined | null | false,
  { timeoutMs = 15_000, intervalMs = 150 }: { timeoutMs?: number; intervalMs?: number } = {},
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value !== undefined && value !== null && value !== false) return value;
    if (Date.now() > deadline) throw new Error(`Timed out after ${timeoutMs} ms waiting until ${what}`);
    await new Promise((resolve) => setTimeout(resolve, intervalMs));
  }
}
