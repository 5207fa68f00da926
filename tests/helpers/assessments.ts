// Assessment runs in tests: start one through the API and wait for it to end, throwing when it fails or hangs.
import { api } from './session';
import { waitFor } from './wait';

/** A run as GET /api/assessments/:id answers it. */
export interface RunStatus {
  id: string;
  status: 'queued' | 'running' | 'succeeded' | 'failed';
  error?: string | null;
  [field: string]: unknown;
}

/** Starts a run (202) and answers its id. */
export async function startRun(cookie: string, body: object = { scope: 'trust' }): Promise<string> {
  const response = await api('/api/assessments', { method: 'POST', cookie, body: JSON.stringify(body) });
  if (response.status !== 202) throw new Error(`Starting a run: ${response.status} ${await response.text()}`);
  return ((await response.json()) as { id: string }).id;
}

/** Waits until the run has ended, succeeded or failed, and answers it; throws when it takes longer than `timeoutMs`. */
export function runEnded(cookie: string, id: string, timeoutMs = 120_000): Promise<RunStatus> {
  return waitFor(
    `run ${id} ends`,
    async () => {
      const response = await api(`/api/assessments/${id}`, { cookie });
      if (response.status !== 200) throw new Error(`Reading run ${id}: ${response.status} ${await response.text()}`);
      const run = (await response.json()) as RunStatus;
      return run.status === 'succeeded' || run.status === 'failed' ? run : undefined;
    },
    { timeoutMs, intervalMs: 250 },
  );
}

/** Waits for the run to succeed; throws with its error when it fails, or when it takes longer than `timeoutMs`. */
export async function runSucceeded(cookie: string, id: string, timeoutMs = 120_000): Promise<RunStatus> {
  const run = await runEnded(cookie, id, timeoutMs);
  if (run.status !== 'succeeded') throw new Error(`Run ${id} failed: ${run.error ?? 'no reason given'}`);
  return run;
}

/** Starts a run and waits for it to succeed (throws when it fails or hangs); answers its id. */
export async function assess(cookie: string, body: object = { scope: 'trust' }, timeoutMs = 120_000): Promise<string> {
  const id = await startRun(cookie, body);
  await runSucceeded(cookie, id, timeoutMs);
  return id;
}
