/**
 * Work finished after the response has gone: e-mails, and account work whose duration must not tell a
 * caller whether an address has an account. Runs in this process (Airtally is one server process);
 * a failure is logged, never shown to the caller.
 */
export function runInBackground(what: string, work: () => Promise<unknown>): void {
  setImmediate(() => {
    work().catch((error: unknown) => console.error(`Background task failed (${what})`, error));
  });
}
